// The phone's own copy of a round, in IndexedDB (through idb): entry works with no network and
// nothing is lost when the page closes. Each reading carries the time it was taken; `sent` is
// set only after the server has answered for that exact reading (same time stamp), so a
// reading edited after it was sent goes out again, and the server stores each (survey, spot) once.
import { openDB, type DBSchema, type IDBPDatabase } from "idb";
import type { RoundReading } from "@/lib/surveys/schemas";

export type StoredReading = RoundReading & { sent: boolean };

export type StoredRound = {
  clientId: string;
  planId: number;
  planVersion: number;
  startedTs: number;
  finishedTs: number | null;
  finishedSent: boolean;
  meterLabel: string;
  meterCalibratedOn: string | null;
  calibratedDistanceMm: number;
  note: string | null;
  resurveyOfActionId: number | null;
  readings: Record<string, StoredReading>;
  /** the server's id once it has stored the round */
  surveyId: number | null;
  /** the server refused the round (bad input): shown, not retried until something changes */
  refused: string | null;
};

export type StoredPhoto = { clientId: string; spotKey: string; blob: Blob; name: string; sent: boolean; refused: string | null };

interface RoundDb extends DBSchema {
  rounds: { key: string; value: StoredRound; indexes: { byPlan: number } };
  photos: { key: [string, string]; value: StoredPhoto; indexes: { byRound: string } };
}

let dbPromise: Promise<IDBPDatabase<RoundDb>> | null = null;

export function roundDb(): Promise<IDBPDatabase<RoundDb>> {
  dbPromise ??= openDB<RoundDb>("stillfield-surveys", 1, {
    upgrade(db) {
      const rounds = db.createObjectStore("rounds", { keyPath: "clientId" });
      rounds.createIndex("byPlan", "planId");
      const photos = db.createObjectStore("photos", { keyPath: ["clientId", "spotKey"] });
      photos.createIndex("byRound", "clientId");
    },
  });
  return dbPromise;
}

export async function roundsOfPlan(planId: number): Promise<StoredRound[]> {
  return (await roundDb()).getAllFromIndex("rounds", "byPlan", planId);
}

export async function allRounds(): Promise<StoredRound[]> {
  return (await roundDb()).getAll("rounds");
}

export async function getRound(clientId: string): Promise<StoredRound | undefined> {
  return (await roundDb()).get("rounds", clientId);
}

export async function putRound(round: StoredRound): Promise<void> {
  await (await roundDb()).put("rounds", round);
}

/** Changes one round inside a transaction, so a sync answer and an entry never overwrite each other. */
export async function updateRound(clientId: string, change: (r: StoredRound) => void): Promise<StoredRound | undefined> {
  const db = await roundDb();
  const tx = db.transaction("rounds", "readwrite");
  const r = await tx.store.get(clientId);
  if (r) {
    change(r);
    await tx.store.put(r);
  }
  await tx.done;
  return r;
}

export async function putPhoto(photo: StoredPhoto): Promise<void> {
  await (await roundDb()).put("photos", photo);
}

export async function photosOfRound(clientId: string): Promise<StoredPhoto[]> {
  return (await roundDb()).getAllFromIndex("photos", "byRound", clientId);
}

export async function markPhoto(clientId: string, spotKey: string, change: Partial<StoredPhoto>): Promise<void> {
  const db = await roundDb();
  const p = await db.get("photos", [clientId, spotKey]);
  if (p) await db.put("photos", { ...p, ...change });
}

/** What is waiting to be sent across every round kept on this phone. */
export async function pendingCounts(): Promise<{ readings: number; photos: number; finishes: number }> {
  const db = await roundDb();
  const rounds = await db.getAll("rounds");
  const photos = await db.getAll("photos");
  return {
    readings: rounds.reduce((n, r) => n + (r.refused ? 0 : Object.values(r.readings).filter((x) => !x.sent).length), 0),
    photos: photos.filter((p) => !p.sent && !p.refused).length,
    finishes: rounds.filter((r) => r.finishedTs !== null && !r.finishedSent && !r.refused).length,
  };
}
