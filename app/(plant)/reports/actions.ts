"use server";
// Thin server-action wrappers for the Reports pages; the checks live in app/_server/actions/reports.ts.
import { getSession } from "@/app/_server/session";
import { emailHandoverAction } from "@/app/_server/actions/reports";

export async function emailHandover(_prev: unknown, fd: FormData) {
  const result = await emailHandoverAction.run(await getSession(), fd);
  if (result.ok) return { ok: true as const, message: `Queued for ${result.data?.toName ?? "the next lead"}; it goes out within a minute.` };
  return result;
}
