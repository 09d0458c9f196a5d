"use server";
// Thin server-action wrapper for "My notifications"; the action checks who may change whose settings.
import { revalidatePath } from "next/cache";
import { getSession } from "@/app/_server/session";
import { saveMyNotificationsAction } from "@/app/_server/actions/my-notifications";

export async function saveMyNotifications(_prev: unknown, fd: FormData) {
  const r = await saveMyNotificationsAction.run(await getSession(), fd);
  if (r.ok) revalidatePath("/notifications");
  return r;
}
