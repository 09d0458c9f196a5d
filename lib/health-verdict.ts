// Whether the plant's processes look healthy, in words (the Health page's banner and the status
// of GET /api/health). Pure: judged from the report alone.
import type { HealthReport } from "./views/health";

export function healthVerdict(r: HealthReport): { ok: boolean; problems: string[] } {
  const problems: string[] = [];
  if (r.workers.length === 0) problems.push("No ingest worker has reported.");
  for (const w of r.workers) {
    if (w.stale) problems.push(`Ingest worker ${w.id} has not reported since ${new Date(w.updatedTs).toISOString()}.`);
    else {
      if (w.mqttConnected === false) problems.push(`Ingest worker ${w.id} is not connected to the broker.`);
      if (w.dbHealthy === false) problems.push(`Ingest worker ${w.id} cannot write to the database.`);
      if ((w.spillPendingReadings ?? 0) > 0) problems.push(`Ingest worker ${w.id} holds ${w.spillPendingReadings} readings in spill files.`);
    }
  }
  for (const b of r.brokers) if (b.stale) problems.push(`Broker ${b.id} has not reported since ${new Date(b.updatedTs).toISOString()}.`);
  if (r.alertOwner && !r.alertOwner.held) problems.push("No process holds the alert owner's lease.");
  if (r.mail.failed > 0) problems.push(`${r.mail.failed} e-mail(s) failed for good.`);
  if (r.texts && r.texts.failed > 0) problems.push(`${r.texts.failed} text message(s) failed for good.`);
  if (r.replica.configured && !r.replica.usable) problems.push(`Reads go to the primary: ${r.replica.reason}.`);
  return { ok: problems.length === 0, problems };
}

/** How long a process that was started again is marked on the Health page. */
export const RESTART_SHOWN_MS = 10 * 60_000;

/**
 * Whether a process was started again lately (the runner or systemd restarted it): it started in
 * the last RESTART_SHOWN_MS and over a minute after the first process of the stack that reports.
 * A stack that just started as a whole marks nothing.
 */
export function restartedLately(startedTs: number | null, firstStartTs: number | null, nowTs: number): boolean {
  return startedTs !== null && firstStartTs !== null && startedTs - firstStartTs > 60_000 && nowTs - startedTs < RESTART_SHOWN_MS;
}
