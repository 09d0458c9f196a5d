"use client";
// The action bar on the alert page: after an action the server-rendered page is refreshed, so
// the state, the history and who was told are re-read from the database.
import { useRouter } from "next/navigation";
import type { AlertState } from "@/lib/vocabulary";
import { AlertActionBar, type AlertFormActions } from "./alert-actions";

export function AlertPageActions(props: { alertId: number; state: AlertState; shelved: boolean; shelvedReason: string | null; actions: AlertFormActions }) {
  const router = useRouter();
  return <AlertActionBar {...props} onDone={() => router.refresh()} />;
}
