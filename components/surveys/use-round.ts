"use client";
// The round page's state: the round kept on this phone for this plan (resumed if one is open),
// what is waiting to be sent, whether the network is there, and syncing when it comes back
// (the browser's online event, a retry every 15 s, and after every saved reading).
import { useCallback, useEffect, useRef, useState } from "react";
import { pendingCounts, putPhoto, putRound, roundsOfPlan, updateRound, type StoredReading, type StoredRound } from "./round-store";
import { syncNow } from "./round-sync";

export type RoundSetup = { meterLabel: string; meterCalibratedOn: string | null; calibratedDistanceMm: number };

export function useRound(plan: { planId: number; version: number }, resurveyOfActionId: number | null) {
  const [round, setRound] = useState<StoredRound | null>(null);
  const [loaded, setLoaded] = useState(false);
  const [pending, setPending] = useState({ readings: 0, photos: 0, finishes: 0 });
  const [online, setOnline] = useState(true);
  const [refused, setRefused] = useState<string | null>(null);
  const [storageError, setStorageError] = useState<string | null>(null);

  // the round on screen, read by the once-registered online listener too (no stale closure)
  const currentId = useRef<string | null>(null);

  const refresh = useCallback(async (clientId?: string) => {
    const rounds = await roundsOfPlan(plan.planId);
    const id = clientId ?? currentId.current;
    // the open round of this plan on this phone, else the one just finished (to show its report link)
    const current = (id ? rounds.find((r) => r.clientId === id) : undefined) ?? rounds.filter((r) => r.finishedTs === null).sort((a, b) => b.startedTs - a.startedTs)[0] ?? null;
    currentId.current = current?.clientId ?? null;
    setRound(current ?? null);
    setPending(await pendingCounts());
  }, [plan.planId]);

  const sync = useCallback(async () => {
    const out = await syncNow();
    setRefused(out.refused);
    await refresh();
  }, [refresh]);

  useEffect(() => {
    // eslint-disable-next-line react-hooks/set-state-in-effect -- navigator exists only in the browser; reading it after mount keeps the first render equal to the server HTML
    setOnline(navigator.onLine);
    refresh()
      .catch((e: unknown) => setStorageError(e instanceof Error ? e.message : "This browser cannot keep readings offline."))
      .finally(() => setLoaded(true));
    const goOnline = () => {
      setOnline(true);
      void sync();
    };
    const goOffline = () => setOnline(false);
    window.addEventListener("online", goOnline);
    window.addEventListener("offline", goOffline);
    const timer = window.setInterval(() => {
      if (navigator.onLine) void sync();
    }, 15_000);
    return () => {
      window.removeEventListener("online", goOnline);
      window.removeEventListener("offline", goOffline);
      window.clearInterval(timer);
    };
    // eslint-disable-next-line react-hooks/exhaustive-deps -- set up once per page
  }, []);

  const start = useCallback(
    async (setup: RoundSetup) => {
      const r: StoredRound = {
        clientId: crypto.randomUUID(),
        planId: plan.planId,
        planVersion: plan.version,
        startedTs: Date.now(),
        finishedTs: null,
        finishedSent: false,
        meterLabel: setup.meterLabel,
        meterCalibratedOn: setup.meterCalibratedOn,
        calibratedDistanceMm: setup.calibratedDistanceMm,
        note: null,
        resurveyOfActionId,
        readings: {},
        surveyId: null,
        refused: null,
      };
      await putRound(r);
      await refresh(r.clientId);
    },
    [plan.planId, plan.version, resurveyOfActionId, refresh],
  );

  const saveReading = useCallback(
    async (reading: Omit<StoredReading, "sent">, photo: File | null) => {
      if (!round) return;
      await updateRound(round.clientId, (r) => {
        r.readings[reading.spotKey] = { ...reading, sent: false };
        r.refused = null;
      });
      if (photo) await putPhoto({ clientId: round.clientId, spotKey: reading.spotKey, blob: photo, name: photo.name || "photo.jpg", sent: false, refused: null });
      await refresh();
      void sync();
    },
    [round, refresh, sync],
  );

  const finish = useCallback(
    async (note: string | null) => {
      if (!round) return;
      await updateRound(round.clientId, (r) => {
        r.finishedTs = Date.now();
        r.note = note;
      });
      await refresh();
      void sync();
    },
    [round, refresh, sync],
  );

  return { round, loaded, pending, online, refused, storageError, start, saveReading, finish, sync };
}
