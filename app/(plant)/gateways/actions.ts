"use server";
// Thin server-action wrappers for the Gateways page; the checks live in app/_server/actions.
import { revalidatePath } from "next/cache";
import { getSession } from "@/app/_server/session";
import { createEdgeNodeAction, saveMappingAction, setTimeSourceAction } from "@/app/_server/actions/gateways";

export async function saveMetricMapping(_prev: unknown, fd: FormData) {
  const r = await saveMappingAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/gateways");
  return r;
}

export async function createEdgeNode(_prev: unknown, fd: FormData) {
  const r = await createEdgeNodeAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/gateways");
  return r;
}

export async function setDeviceTimeSource(_prev: unknown, fd: FormData) {
  const r = await setTimeSourceAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/devices");
  return r;
}
