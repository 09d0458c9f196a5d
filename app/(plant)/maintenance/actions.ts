"use server";
// Thin server-action wrappers for the Planned work page; the checks live in app/_server/actions/maintenance.ts.
import { revalidatePath } from "next/cache";
import { getSession } from "@/app/_server/session";
import { endMaintenanceWindowAction, extendMaintenanceWindowAction, openMaintenanceWindowAction } from "@/app/_server/actions/maintenance";

export async function openMaintenanceWindow(_prev: unknown, fd: FormData) {
  const r = await openMaintenanceWindowAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/maintenance");
  return r.ok ? { ...r, message: "Planned work saved. Alerts it explains are recorded without telling on call until it ends." } : r;
}

export async function extendMaintenanceWindow(_prev: unknown, fd: FormData) {
  const r = await extendMaintenanceWindowAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/maintenance");
  return r;
}

export async function endMaintenanceWindow(_prev: unknown, fd: FormData) {
  const r = await endMaintenanceWindowAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/maintenance");
  return r;
}
