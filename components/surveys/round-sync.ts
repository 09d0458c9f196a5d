// Sends what the phone holds when the network is there: each round's unsent readings (with the
// times they were taken) and its finish, then its photos. One sync at a time per page; the
// server is idempotent by the round's client-made id, so a send that was cut after the server
// stored it but before the answer arrived is simply stored once when it goes again.
import { allRounds, markPhoto, photosOfRound, updateRound, type StoredRound } from "./round-store";

let running: Promise<SyncOutcome> | null = null;

export type SyncOutcome = { sent: number; failed: boolean; refused: string | null; surveyIds: Record<string, number> };

export function syncNow(): Promise<SyncOutcome> {
  running ??= doSync().finally(() => {
    running = null;
  });
  return running;
}

async function errorText(res: Response): Promise<string> {
  try {
    const body = (await res.json()) as { error?: unknown };
    return typeof body.error === "string" ? body.error : `The server answered ${res.status}.`;
  } catch {
    return `The server answered ${res.status}.`;
  }
}

async function sendRound(r: StoredRound): Promise<{ ok: boolean; sent: number; refused: string | null; surveyId: number | null }> {
  const unsent = Object.values(r.readings).filter((x) => !x.sent);
  const finishPending = r.finishedTs !== null && !r.finishedSent;
  if (!unsent.length && !finishPending && r.surveyId !== null) return { ok: true, sent: 0, refused: null, surveyId: r.surveyId };
  const body = {
    clientId: r.clientId,
    planId: r.planId,
    planVersion: r.planVersion,
    startedTs: r.startedTs,
    finishedTs: r.finishedTs,
    meterLabel: r.meterLabel,
    meterCalibratedOn: r.meterCalibratedOn,
    calibratedDistanceMm: r.calibratedDistanceMm,
    note: r.note,
    resurveyOfActionId: r.resurveyOfActionId,
    readings: unsent.map(({ sent: _sent, ...rest }) => rest),
  };
  let res: Response;
  try {
    res = await fetch("/api/surveys/rounds", { method: "POST", headers: { "Content-Type": "application/json" }, body: JSON.stringify(body) });
  } catch {
    return { ok: false, sent: 0, refused: null, surveyId: null };
  }
  if (res.status >= 400 && res.status < 500 && res.status !== 401 && res.status !== 408 && res.status !== 429) {
    const why = await errorText(res);
    await updateRound(r.clientId, (x) => {
      x.refused = why;
    });
    return { ok: false, sent: 0, refused: why, surveyId: null };
  }
  if (!res.ok) return { ok: false, sent: 0, refused: null, surveyId: null };
  const data = (await res.json()) as { surveyId: number };
  await updateRound(r.clientId, (x) => {
    x.surveyId = data.surveyId;
    x.refused = null;
    for (const s of unsent) {
      const now = x.readings[s.spotKey];
      // only the reading that was sent: one edited meanwhile goes out on the next sync
      if (now && now.ts === s.ts) now.sent = true;
    }
    if (finishPending && x.finishedTs === r.finishedTs) x.finishedSent = true;
  });
  return { ok: true, sent: unsent.length, refused: null, surveyId: data.surveyId };
}

async function sendPhotos(clientId: string): Promise<boolean> {
  for (const p of await photosOfRound(clientId)) {
    if (p.sent || p.refused) continue;
    const fd = new FormData();
    fd.set("clientId", clientId);
    fd.set("spotKey", p.spotKey);
    fd.set("file", p.blob, p.name);
    let res: Response;
    try {
      res = await fetch("/api/surveys/photos", { method: "POST", body: fd });
    } catch {
      return false;
    }
    if (res.ok) await markPhoto(clientId, p.spotKey, { sent: true });
    else if (res.status === 422 || res.status === 400 || res.status === 413) await markPhoto(clientId, p.spotKey, { refused: await errorText(res) });
    else return false;
  }
  return true;
}

async function doSync(): Promise<SyncOutcome> {
  const out: SyncOutcome = { sent: 0, failed: false, refused: null, surveyIds: {} };
  if (typeof navigator !== "undefined" && navigator.onLine === false) return { ...out, failed: true };
  for (const r of await allRounds()) {
    if (r.refused) {
      out.refused = r.refused;
      continue;
    }
    const res = await sendRound(r);
    if (res.refused) out.refused = res.refused;
    if (!res.ok) {
      out.failed = out.failed || !res.refused;
      continue;
    }
    out.sent += res.sent;
    if (res.surveyId !== null) {
      out.surveyIds[r.clientId] = res.surveyId;
      if (!(await sendPhotos(r.clientId))) out.failed = true;
    }
  }
  return out;
}
