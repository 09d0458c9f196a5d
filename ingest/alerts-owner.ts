// One alert owner among several ingest workers (ALERTS_OWNER=lease). Every worker runs this
// sink; exactly one at a time holds the "alerts" lease in MariaDB (service_leases) and runs the
// rules engine (ingest/alerts-runner.ts) on every worker's committed readings, read from the
// reading journal in commit order (ingest/alert-journal.ts).
//
// Why a lease row with a fencing token rather than GET_LOCK: a GET_LOCK belongs to one
// connection of a pool and vanishes silently with it, gives no token that a write transaction
// can check, and is not carried across a Galera cluster; the lease row is an ordinary row
// (replicated like any other), its token grows with every new owner, and every write of alert
// transitions locks that row and checks the token in the same transaction
// (ingest/alert-engine-rows.ts), so an owner that was paused past its lease cannot write.
//
// Timing: the owner renews every ALERTS_LEASE_RENEW_MS (3 s) for ALERTS_LEASE_TTL_MS (10 s,
// database clock); the others try to take it every renew interval, so a dead owner is replaced
// within TTL + one interval (≤ 13 s). An owner that cannot renew stops evaluating on its own
// well before its lease runs out (so it never runs escalation beside its successor).
import os from "node:os";
import { acquireLease, listDeviceCodes, purgeJournal, releaseLease, renewLease } from "../db/queries/alert-owner";
import { getSettings } from "../lib/settings";
import { decodeJournal, JournalReader, type JournalPosition } from "./alert-journal";
import { AlertEngineRows, OWNER_LEASE } from "./alert-engine-rows";
import { startCore, type Core } from "./alerts-runner";
import { describeError } from "./log";
import type { CommittedReading, ReadingSink, SinkContext } from "./sinks";

export type OwnerStatus = { owner: boolean; token: number | null; sinceTs: number | null; fed: number; journalFloor: number | null };

export async function createAlertOwner(ctx: SinkContext): Promise<ReadingSink & { status(): OwnerStatus }> {
  const s = getSettings();
  const { log, pool, db } = ctx;
  const holder = `${s.INGEST_CLIENT_ID}@${os.hostname()}#${process.pid}`.slice(0, 120);
  const ttl = s.ALERTS_LEASE_TTL_MS;
  const renewEvery = s.ALERTS_LEASE_RENEW_MS;
  // stop evaluating this long after the last good renewal (the lease lasts ttl from it)
  const selfDeadlineMs = Math.max(ttl - renewEvery, ttl / 2);

  let token: number | null = null;
  let sinceTs: number | null = null;
  let lastRenewOk = 0;
  let core: Core | null = null;
  let reader: JournalReader | null = null;
  let readingTs = 0;
  let fed = 0;
  let codes = new Map<number, string>();
  let codesLoadedTs = 0;
  let busy = false;
  let closed = false;
  let lastTick = 0;
  let lastPurge = 0;

  async function refreshCodes(force: boolean) {
    if (!force && Date.now() - codesLoadedTs < 5000) return;
    codes = await listDeviceCodes(db);
    codesLoadedTs = Date.now();
  }

  async function becomeOwner(t: number) {
    await refreshCodes(true);
    const store: AlertEngineRows = new AlertEngineRows({
      db,
      log,
      token: t,
      warmUpMs: s.ALERTS_WARMUP_MS,
      // before the first read (while startCore loads and reconciles): where the load says to start
      position: (): JournalPosition & { readingTs: number } => (reader ? { ...reader.position(), readingTs } : store.start),
      codeOf: (id) => codes.get(id),
    });
    reader = null;
    const started = await startCore(ctx, store);
    reader = new JournalReader(db, store.start);
    readingTs = store.start.readingTs;
    core = started;
    log.info(`this worker is the alert owner now (lease token ${t})`, { holder });
  }

  async function dropOwnership(why: string) {
    const c = core;
    const t = token;
    core = null;
    reader = null;
    token = null;
    sinceTs = null;
    if (c) await c.close().catch((err: unknown) => log.debug("closing the alerts engine after losing the lease", { error: describeError(err) }));
    if (t !== null && why === "stopping") await releaseLease(pool, OWNER_LEASE, t).catch(() => undefined);
    log.info(`no longer the alert owner (${why})`);
  }

  async function leaseRound() {
    const now = Date.now();
    if (token === null) {
      const t = await acquireLease(pool, OWNER_LEASE, holder, ttl);
      if (t === null) return;
      token = t;
      sinceTs = now;
      lastRenewOk = now;
      try {
        await becomeOwner(t);
      } catch (err) {
        log.error("could not start as alert owner; giving the lease back", { error: describeError(err) });
        await releaseLease(pool, OWNER_LEASE, t).catch(() => undefined);
        token = null;
        core = null;
      }
      return;
    }
    const ok = await renewLease(pool, OWNER_LEASE, holder, token, ttl);
    if (ok) lastRenewOk = now;
    else await dropOwnership("the lease was taken over");
  }

  async function feed() {
    if (!core || !reader) return;
    if (Date.now() - lastRenewOk > selfDeadlineMs) return dropOwnership("could not renew the lease in time");
    for (let round = 0; round < 20 && core && reader; round++) {
      const entries = await reader.next(200);
      if (entries.length === 0) break;
      const readings: CommittedReading[] = [];
      let unknown = false;
      for (const e of entries) {
        for (const r of decodeJournal(e.body)) {
          const code = codes.get(r.deviceId);
          if (!code) unknown = true;
          readings.push({ deviceId: r.deviceId, deviceCode: code ?? String(r.deviceId), channel: r.channel, ts: r.ts, value: r.value, historical: r.historical });
          if (!r.historical && r.ts > readingTs) readingTs = r.ts;
        }
      }
      if (unknown) {
        await refreshCodes(false);
        for (const r of readings) r.deviceCode = codes.get(r.deviceId) ?? r.deviceCode;
      }
      readings.sort((a, b) => a.deviceId - b.deviceId || a.ts - b.ts);
      fed += readings.length;
      await core.onCommitted(readings);
    }
    const now = Date.now();
    if (core && now - lastTick >= 1000) {
      lastTick = now;
      await core.onTick(now);
    }
    if (core && now - lastPurge >= 60_000) {
      lastPurge = now;
      await purgeJournal(db, now - s.ALERTS_JOURNAL_KEEP_MS).catch((err: unknown) => log.debug("journal purge failed", { error: describeError(err) }));
    }
  }

  const run = async (what: () => Promise<void>) => {
    if (busy || closed) return;
    busy = true;
    try {
      await what();
    } catch (err) {
      log.warn("alert owner round failed; will retry", { error: describeError(err) });
    } finally {
      busy = false;
    }
  };
  const leaseTimer = setInterval(() => void run(leaseRound), renewEvery);
  const feedTimer = setInterval(() => void run(feed), s.ALERTS_JOURNAL_POLL_MS);
  void run(leaseRound);

  return {
    name: "alerts",
    // readings reach the owner through the journal, whichever worker stored them
    async onCommitted() {},
    status: () => ({ owner: token !== null && core !== null, token, sinceTs, fed, journalFloor: reader?.position().floor ?? null }),
    async close() {
      clearInterval(leaseTimer);
      clearInterval(feedTimer);
      while (busy) await new Promise((r) => setTimeout(r, 20));
      closed = true;
      if (token !== null) await dropOwnership("stopping");
    },
  };
}
