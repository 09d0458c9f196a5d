// Gateways: every Sparkplug B edge node, the devices and metrics its births declared (mapped or
// not) with last value, unit and age, its refused messages with their reasons, and its clock.
// Engineers map metrics to Stillfield devices and channels; admins register edge nodes.
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { listGateways, listMappingTargets } from "@/db/queries/gateways";
import { Card, EmptyState, Forbidden, PageHeader } from "@/components/ui/page";
import { StateBadge } from "@/components/ui/state-badge";
import { can } from "@/lib/permissions";
import { describeSkew, isClockOff } from "@/lib/clock-skew";
import { getSettings } from "@/lib/settings";
import { CHANNEL_UNITS, CONVERSION_LABELS } from "@/lib/sparkplug/metrics";
import { GATEWAY_REJECTION_LABELS, type GatewayRejectionReason } from "@/lib/sparkplug/host-state";
import type { EdgeNodeView, MappingTarget } from "@/lib/sparkplug/view";
import { fmtAgo } from "../equipment/_components/format";
import { AddEdgeNodeForm, MappingForm } from "./_components/gateway-forms";

export const metadata: Metadata = { title: "Gateways" };
export const dynamic = "force-dynamic";

const reasonLabel = (r: string) => GATEWAY_REJECTION_LABELS[r as GatewayRejectionReason] ?? r;

export default async function GatewaysPage() {
  const { allowed, session } = await requirePagePermission("view", "/gateways");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Gateways" />
        <Forbidden what="see the gateways" />
      </div>
    );
  }
  const db = getDb();
  const nowMs = Date.now();
  const [nodes, targets] = await Promise.all([listGateways(db), listMappingTargets(db)]);
  const mayMap = can(session.role, "gateways.map");
  const isAdmin = can(session.role, "devices.manage");
  return (
    <div>
      <PageHeader
        title="Gateways"
        subtitle="Edge nodes that speak Sparkplug B: what their births declared, what feeds which sensor, and what was refused."
      />
      {isAdmin ? (
        <Card title="Register an edge node" className="mb-5">
          <AddEdgeNodeForm />
          <p className="mt-3 border-t border-paper-line pt-3 text-xs leading-relaxed text-ink-faint">
            The node signs in with its name and secret and may publish only under spBv1.0/&lt;group&gt;/…/&lt;its node id&gt;. See README, “Connecting a Sparkplug gateway”.
          </p>
        </Card>
      ) : null}
      {nodes.length === 0 ? (
        <Card>
          <EmptyState title="No edge nodes yet">{isAdmin ? "Register one above, then point the gateway at the broker." : "An admin registers edge nodes here."}</EmptyState>
        </Card>
      ) : (
        nodes.map((n) => <NodeCard key={n.id} node={n} nowMs={nowMs} targets={targets} mayMap={mayMap} />)
      )}
    </div>
  );
}

function NodeCard({ node: n, nowMs, targets, mayMap }: { node: EdgeNodeView; nowMs: number; targets: MappingTarget[]; mayMap: boolean }) {
  const skewOff = isClockOff(n.clockSkewMs, getSettings().CLOCK_SKEW_LIMIT_MS);
  const targetName = new Map(targets.map((t) => [t.deviceId, `${t.place} — ${t.code}`]));
  const deviceNames = [...new Set(n.metrics.map((m) => m.deviceName))];
  return (
    <section className="mb-5" data-testid="edge-node" data-code={n.code}>
      <Card
        title={
          <span className="flex flex-wrap items-center gap-2">
            <span>{n.label}</span>
            <code className="break-all text-xs font-normal text-ink-faint">
              {n.groupId}/{n.nodeId}
            </code>
            {n.online ? <StateBadge state="normal" label="Online" /> : <StateBadge state="silent" label={n.lastDeathTs ? `Offline · ${fmtAgo(n.lastDeathTs, nowMs)}` : "Offline"} />}
            {!n.enabled ? <StateBadge state="shelved" label="Disabled" /> : null}
          </span>
        }
        aside={<span className="text-xs text-ink-faint">sign-in {n.code}</span>}
      >
        <dl className="mb-3 grid grid-cols-2 gap-x-4 gap-y-1 text-sm sm:grid-cols-5">
          <div>
            <dt className="text-xs text-ink-faint">Last seen</dt>
            <dd>{fmtAgo(n.lastSeenTs, nowMs)}</dd>
          </div>
          <div>
            <dt className="text-xs text-ink-faint">Session (bdSeq)</dt>
            <dd className="num">{n.bdSeq ?? "—"}</dd>
          </div>
          <div>
            <dt className="text-xs text-ink-faint">Clock</dt>
            <dd data-testid="node-clock">{n.clockSkewMs === null ? "—" : skewOff ? <StateBadge state="near" label={`Off: ${describeSkew(n.clockSkewMs)}`} /> : describeSkew(n.clockSkewMs)}</dd>
          </div>
          <div>
            <dt className="text-xs text-ink-faint">Seq gaps / rebirths asked</dt>
            <dd className="num">
              {n.seqGaps} / {n.rebirthRequests}
            </dd>
          </div>
          <div>
            <dt className="text-xs text-ink-faint">Refused</dt>
            <dd className="num" data-testid="node-refused">
              {n.rejectedCount}
            </dd>
          </div>
        </dl>
        {n.metrics.length === 0 ? (
          <EmptyState title="No birth received yet">Metrics appear here once the node publishes its NBIRTH and DBIRTH messages.</EmptyState>
        ) : (
          <div className="relative -mx-4 overflow-x-auto" tabIndex={0} role="region" aria-label={`Metrics of ${n.label} (scrolls sideways on a narrow screen)`}>
            <table className="w-full min-w-[56rem] text-sm" data-testid="metric-table">
              <thead className="text-left text-xs text-ink-faint">
                <tr>
                  <th className="px-4 py-2 font-medium">Metric</th>
                  <th className="py-2 pr-3 font-medium">Type</th>
                  <th className="py-2 pr-3 text-right font-medium">Last value</th>
                  <th className="py-2 pr-3 font-medium">Age</th>
                  <th className="py-2 pr-4 font-medium">Feeds</th>
                </tr>
              </thead>
              <tbody>
                {deviceNames.map((dn) => {
                  const dev = n.devices.find((d) => d.deviceName === dn);
                  return (
                    <DeviceRows key={dn} name={dn} online={dev?.online ?? false}>
                      {n.metrics
                        .filter((m) => m.deviceName === dn)
                        .map((m) => (
                          <tr key={m.id} className="border-t border-paper-line align-top" data-testid="metric-row" data-metric={`${dn}/${m.name}`}>
                            <td className="px-4 py-2">
                              <span className="font-medium">{m.name}</span>
                              {m.alias !== null ? <span className="ml-1 text-xs text-ink-faint">alias {m.alias}</span> : null}
                            </td>
                            <td className="py-2 pr-3 text-ink-soft">{m.datatype}</td>
                            <td className="num whitespace-nowrap py-2 pr-3 text-right">
                              {m.lastValue !== null ? m.lastValue.toLocaleString("en-GB", { maximumFractionDigits: 4 }) : (m.lastText ?? "—")} {m.unit ?? ""}
                            </td>
                            <td className="whitespace-nowrap py-2 pr-3 text-ink-soft">{fmtAgo(m.lastTs, nowMs)}</td>
                            <td className="py-2 pr-4">
                              {mayMap ? (
                                <MappingForm metric={m} targets={targets} />
                              ) : m.targetDeviceId ? (
                                <span>
                                  {targetName.get(m.targetDeviceId) ?? `device ${m.targetDeviceId}`} · {m.targetChannel} ({m.targetChannel ? CHANNEL_UNITS[m.targetChannel] : ""}), {CONVERSION_LABELS[m.conversion]}
                                </span>
                              ) : (
                                <span className="text-ink-faint">Not mapped</span>
                              )}
                            </td>
                          </tr>
                        ))}
                    </DeviceRows>
                  );
                })}
              </tbody>
            </table>
          </div>
        )}
        <Refusals node={n} nowMs={nowMs} />
      </Card>
    </section>
  );
}

function DeviceRows({ name, online, children }: { name: string; online: boolean; children: React.ReactNode }) {
  return (
    <>
      <tr className="border-t border-paper-line bg-paper/60">
        <th colSpan={5} className="px-4 py-1.5 text-left text-xs font-semibold uppercase tracking-wide text-ink-soft">
          {name === "" ? "Node metrics" : name}
          <span className="ml-2 normal-case">{online ? <StateBadge state="normal" label="Online" /> : <StateBadge state="silent" label="Offline" />}</span>
        </th>
      </tr>
      {children}
    </>
  );
}

function Refusals({ node: n, nowMs }: { node: EdgeNodeView; nowMs: number }) {
  const reasons = Object.entries(n.rejectedByReason);
  if (n.rejections.length === 0) return <p className="mt-3 text-xs text-ink-faint">Nothing refused.</p>;
  return (
    <details className="mt-3" data-testid="node-refusals">
      <summary className="cursor-pointer text-sm text-ink-soft">
        Refused messages: {reasons.map(([r, c]) => `${reasonLabel(r)} ${c}`).join(" · ")}
      </summary>
      <ul className="mt-2 space-y-1 text-xs">
        {n.rejections.map((r) => (
          <li key={r.id} className="flex flex-wrap gap-x-2">
            <span className="text-ink-faint">{fmtAgo(r.ts, nowMs)}</span>
            <span className="font-medium">{reasonLabel(r.reason)}</span>
            <span className="break-all text-ink-soft">{r.detail}</span>
            <code className="break-all text-ink-faint">{r.topic}</code>
          </li>
        ))}
      </ul>
    </details>
  );
}
