"use server";
// Thin server-action wrappers for the alert forms; each action checks the role itself.
import { getSession } from "@/app/_server/session";
import { ackAlertAction, ackAlertGroupAction, commentAlertAction, shelveAlertAction, unshelveAlertAction } from "@/app/_server/actions/alerts";

export async function ackAlert(_prev: unknown, fd: FormData) {
  return ackAlertAction.run(await getSession(), fd);
}
export async function ackAlertGroup(_prev: unknown, fd: FormData) {
  return ackAlertGroupAction.run(await getSession(), fd);
}
export async function commentAlert(_prev: unknown, fd: FormData) {
  return commentAlertAction.run(await getSession(), fd);
}
export async function shelveAlert(_prev: unknown, fd: FormData) {
  return shelveAlertAction.run(await getSession(), fd);
}
export async function unshelveAlert(_prev: unknown, fd: FormData) {
  return unshelveAlertAction.run(await getSession(), fd);
}
