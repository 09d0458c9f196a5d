// Health (admins): every process and its figures — brokers, ingest workers, the alert owner, the
// mail and text queues, the read replica — as they last reported to MariaDB, so any app instance
// shows the same. The same report is served as JSON at /api/health for a plant's monitoring.
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getDb, getReplicaState } from "@/db/client";
import { getHealthReport } from "@/db/queries/health";
import { Card, EmptyState, Forbidden, PageHeader } from "@/components/ui/page";
import { healthVerdict, restartedLately } from "@/lib/health-verdict";
import type { QueueHealth } from "@/lib/views/health";
import { fmtAgo } from "../equipment/_components/format";

export const metadata: Metadata = { title: "Health" };
export const dynamic = "force-dynamic";

const fig = (v: number | null, unit = "") => (v === null ? "not reported" : `${v.toLocaleString("en-GB")}${unit}`);
const utc = (ts: number) => `${new Date(ts).toISOString().slice(0, 19).replace("T", " ")} UTC`;
const since = (ts: number | null, now: number) => (ts === null ? "not reported" : `${utc(ts)} (${fmtAgo(ts, now)})`);
function Started({ ts, firstStartTs, now }: { ts: number | null; firstStartTs: number | null; now: number }) {
  const again = restartedLately(ts, firstStartTs, now);
  return <Row label="Running since" value={again ? `${since(ts, now)}, started again` : since(ts, now)} warn={again} />;
}
const yesNo = (v: boolean | null, yes: string, no: string) => (v === null ? "not reported" : v ? yes : no);

function Row({ label, value, warn }: { label: string; value: React.ReactNode; warn?: boolean }) {
  return (
    <div className="flex justify-between gap-4 border-b border-paper-line py-1 text-sm last:border-0">
      <dt className="text-ink-soft">{label}</dt>
      <dd className={warn ? "text-right font-semibold text-over" : "text-right tabular-nums"}>{value}</dd>
    </div>
  );
}

function Queue({ q, nowMs }: { q: QueueHealth; nowMs: number }) {
  return (
    <dl>
      <Row label="Waiting to send" value={q.pending} />
      <Row label="Being sent" value={q.sending} />
      <Row label="Failed for good" value={q.failed} warn={q.failed > 0} />
      <Row label="Oldest waiting" value={q.oldestPendingTs === null ? "none" : fmtAgo(q.oldestPendingTs, nowMs)} />
    </dl>
  );
}

export default async function HealthPage() {
  const { allowed } = await requirePagePermission("health.view", "/health");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Health" />
        <Forbidden what="see the health of Stillfield's processes" />
      </div>
    );
  }
  const r = await getHealthReport(getDb(), await getReplicaState());
  const verdict = healthVerdict(r);
  const now = r.nowTs;
  const starts = [...r.brokers, ...r.workers].map((p) => p.startedTs).filter((t): t is number => t !== null);
  const firstStartTs = starts.length ? Math.min(...starts) : null;
  return (
    <div className="space-y-4" data-testid="health-page">
      <PageHeader title="Health" subtitle="Each process's figures as it last reported them. Also as JSON at /api/health." />
      <Card>
        {verdict.ok ? (
          <p data-testid="health-verdict">All processes report and nothing is waiting that should not be.</p>
        ) : (
          <ul data-testid="health-verdict" className="list-disc pl-5 text-sm">
            {verdict.problems.map((p) => (
              <li key={p}>{p}</li>
            ))}
          </ul>
        )}
      </Card>
      <div className="grid gap-4 md:grid-cols-2 xl:grid-cols-3">
        {r.brokers.length === 0 ? (
          <Card title="Broker">
            <EmptyState title="Not reported">No broker has written its figures (a broker the plant runs itself reports none).</EmptyState>
          </Card>
        ) : (
          r.brokers.map((b) => (
            <Card key={b.id} title={`Broker ${b.id}`} aside={fmtAgo(b.updatedTs, now)}>
              <dl data-testid="health-broker">
                <Row label="Reporting" value={b.stale ? "no" : "yes"} warn={b.stale} />
                <Started ts={b.startedTs} firstStartTs={firstStartTs} now={now} />
                <Row label="Clients connected" value={fig(b.clients)} />
                <Row label="Messages per second" value={fig(b.messagesPerS)} />
                <Row label="Messages since start" value={fig(b.messagesIn)} />
              </dl>
            </Card>
          ))
        )}
        {r.workers.map((w) => (
          <Card key={w.id} title={`Ingest worker ${w.id}`} aside={fmtAgo(w.updatedTs, now)}>
            <dl data-testid="health-worker">
              <Row label="Reporting" value={w.stale ? "no" : "yes"} warn={w.stale} />
              <Started ts={w.startedTs} firstStartTs={firstStartTs} now={now} />
              <Row label="Broker" value={yesNo(w.mqttConnected, "connected", "not connected")} warn={w.mqttConnected === false} />
              <Row label="Database" value={yesNo(w.dbHealthy, "writing", "not writing")} warn={w.dbHealthy === false} />
              <Row label="Readings stored per second" value={fig(w.readingsPerS)} />
              <Row label="Messages per second" value={fig(w.messagesPerS)} />
              <Row label="In flight (readings / unacknowledged messages)" value={`${fig(w.inFlightReadings)} / ${fig(w.unackedMessages)}`} />
              <Row label="In spill files now" value={fig(w.spillPendingReadings)} warn={(w.spillPendingReadings ?? 0) > 0} />
              <Row label="Spilled since start" value={fig(w.spilledReadings)} />
              <Row label="Reading age when stored, p95" value={fig(w.commitP95Ms, " ms")} />
              <Row label="Memory (RSS)" value={fig(w.rssMb, " MB")} />
            </dl>
          </Card>
        ))}
        <Card title="Alert owner">
          <dl data-testid="health-owner">
            {r.alertOwner ? (
              <>
                <Row label="Held by" value={r.alertOwner.held ? (r.alertOwner.holder ?? "–") : "nobody"} warn={!r.alertOwner.held} />
                <Row label="Since" value={since(r.alertOwner.sinceTs, now)} />
                <Row label="Hand-overs so far" value={Math.max(0, r.alertOwner.token - 1)} />
              </>
            ) : r.alertsInWorker ? (
              <>
                <Row label="Rules run in" value={r.alertsInWorker.id} />
                <Row label="How" value="its own readings, no lease (one worker)" />
                <Row label="Since" value={since(r.alertsInWorker.startedTs, now)} />
              </>
            ) : (
              <Row label="Held by" value="not reported" />
            )}
          </dl>
        </Card>
        <Card title="Mail queue">
          <Queue q={r.mail} nowMs={now} />
        </Card>
        {r.texts && (
          <Card title="Text message queue">
            <Queue q={r.texts} nowMs={now} />
          </Card>
        )}
        <Card title="Read replica">
          <dl data-testid="health-replica">
            <Row label="Configured" value={r.replica.configured ? "yes" : "no"} />
            {r.replica.configured && (
              <>
                <Row label="Chart and report reads go to" value={r.replica.usable ? "the replica" : "the primary"} warn={!r.replica.usable} />
                <Row label="Lag" value={r.replica.lagS === null ? "unknown" : `${r.replica.lagS} s`} />
              </>
            )}
            <Row label="Why" value={r.replica.reason} />
          </dl>
        </Card>
      </div>
    </div>
  );
}
