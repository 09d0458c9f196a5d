"use server";
// Thin server-action wrappers for the on-call page; each action checks the role itself.
import { revalidatePath } from "next/cache";
import { getSession } from "@/app/_server/session";
import { addShiftAction, removeShiftAction, saveAlertingSettingsAction } from "@/app/_server/actions/oncall";
import { savePlantLocationAction } from "@/app/_server/actions/plant-location";

export async function addShift(_prev: unknown, fd: FormData) {
  const r = await addShiftAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/oncall");
  return r;
}
export async function removeShift(_prev: unknown, fd: FormData) {
  const r = await removeShiftAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/oncall");
  return r;
}
export async function saveAlertingSettings(_prev: unknown, fd: FormData) {
  const r = await saveAlertingSettingsAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/oncall");
  return r;
}
export async function savePlantLocation(_prev: unknown, fd: FormData) {
  const r = await savePlantLocationAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/oncall");
  return r;
}
