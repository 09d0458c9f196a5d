"use server";
import { getSession } from "@/app/_server/session";
import { addPersonAction, resetPasswordAction, setActiveAction, setRoleAction } from "@/app/_server/actions/people";
import type { ActionResult } from "@/app/_server/action";
import { revalidatePath } from "next/cache";

async function run(a: { run: (s: Awaited<ReturnType<typeof getSession>>, fd: FormData) => Promise<ActionResult<unknown>> }, fd: FormData) {
  const result = await a.run(await getSession(), fd);
  if (result.ok) revalidatePath("/people");
  return result;
}

export async function addPerson(_prev: unknown, fd: FormData) {
  return run(addPersonAction, fd);
}
export async function setRole(_prev: unknown, fd: FormData) {
  return run(setRoleAction, fd);
}
export async function setActive(_prev: unknown, fd: FormData) {
  return run(setActiveAction, fd);
}
export async function resetPassword(_prev: unknown, fd: FormData) {
  return run(resetPasswordAction, fd);
}
