"use server";
// Thin server-action wrappers for the Checks page; the checks live in app/_server/actions.
import { revalidatePath } from "next/cache";
import { getSession } from "@/app/_server/session";
import { recordCheckAction, saveCheckLimitsAction, sendDueListNowAction } from "@/app/_server/actions/checks";

export async function recordCheck(_prev: unknown, fd: FormData) {
  const r = await recordCheckAction.run(await getSession(), fd);
  if (r.ok) {
    revalidatePath("/checks");
    revalidatePath("/equipment", "layout");
  }
  return r;
}

export async function saveCheckLimits(_prev: unknown, fd: FormData) {
  const r = await saveCheckLimitsAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/checks");
  return r;
}

export async function sendDueListNow(_prev: unknown, fd: FormData) {
  const r = await sendDueListNowAction.run(await getSession(), fd);
  if (!r.ok) return r;
  const { queued, recipients } = r.data!;
  const message =
    recipients === 0
      ? "Nobody is on the maintenance list yet; an admin can add people on the People page."
      : queued === 0
        ? "Already queued a moment ago."
        : `Queued for ${queued} ${queued === 1 ? "person" : "people"} on the maintenance list.`;
  return { ...r, message };
}
