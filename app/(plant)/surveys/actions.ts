"use server";
// Thin server-action wrappers for the survey pages; the checks and the work live in
// app/_server/actions/surveys.ts.
import { revalidatePath } from "next/cache";
import { getSession } from "@/app/_server/session";
import { closeSurveyActionAction, createSurveyActionAction, savePlanAction } from "@/app/_server/actions/surveys";

export async function savePlan(_prev: unknown, fd: FormData) {
  const r = await savePlanAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/surveys", "layout");
  return r.ok ? { ...r, message: r.data?.changed ? `Saved as version ${r.data.version}.` : "Nothing changed." } : r;
}

export async function createSurveyAction(_prev: unknown, fd: FormData) {
  const r = await createSurveyActionAction.run(await getSession(), fd);
  if (r.ok) {
    revalidatePath("/surveys", "layout");
    revalidatePath("/checks");
  }
  return r.ok ? { ...r, message: "Action added to the due list." } : r;
}

export async function closeSurveyAction(_prev: unknown, fd: FormData) {
  const r = await closeSurveyActionAction.run(await getSession(), fd);
  if (r.ok) {
    revalidatePath("/surveys", "layout");
    revalidatePath("/checks");
  }
  return r.ok ? { ...r, message: "Action closed." } : r;
}
