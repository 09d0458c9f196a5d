"use server";
// Thin server-action wrappers for the equipment pages; the checks live in app/_server/actions.
import { revalidatePath } from "next/cache";
import { getSession } from "@/app/_server/session";
import { addEquipmentNoteAction, createNeutralizerAction, markCleanedAction, updateNeutralizerAction } from "@/app/_server/actions/equipment";

export async function createNeutralizer(_prev: unknown, fd: FormData) {
  const r = await createNeutralizerAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/equipment");
  return r;
}

export async function updateNeutralizer(_prev: unknown, fd: FormData) {
  const r = await updateNeutralizerAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/equipment", "layout");
  return r;
}

export async function markCleaned(_prev: unknown, fd: FormData) {
  const r = await markCleanedAction.run(await getSession(), fd);
  if (r.ok) {
    revalidatePath("/equipment", "layout");
    revalidatePath("/checks");
  }
  return r;
}

export async function addEquipmentNote(_prev: unknown, fd: FormData) {
  const r = await addEquipmentNoteAction.run(await getSession(), fd);
  if (r.ok) {
    revalidatePath("/equipment", "layout");
    revalidatePath("/devices", "layout");
  }
  return r;
}
