"use server";
// Thin server-action wrappers for the Devices pages; the checks live in app/_server/actions.
import { revalidatePath } from "next/cache";
import { getSession } from "@/app/_server/session";
import { createDeviceAction, rotateDeviceSecretAction, setDeviceEnabledAction, updateDeviceAction } from "@/app/_server/actions/devices";

export async function createDevice(_prev: unknown, fd: FormData) {
  const r = await createDeviceAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/devices");
  return r;
}

export async function rotateDeviceSecret(_prev: unknown, fd: FormData) {
  const r = await rotateDeviceSecretAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/devices", "layout");
  return r;
}

export async function setDeviceEnabled(_prev: unknown, fd: FormData) {
  const r = await setDeviceEnabledAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/devices", "layout");
  return r;
}

export async function updateDevice(_prev: unknown, fd: FormData) {
  const r = await updateDeviceAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/devices", "layout");
  return r;
}
