// Limits: the rules behind the alerts, per hall, line and point, with a replay over recorded
// data before any change is saved, and the latest changes from the audit log. Everyone sees the
// limits; engineers and admins change them (the route handlers and actions check again).
import type { Metadata } from "next";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import { getPlantSettings } from "@/db/queries/equipment";
import { getPlantLayout } from "@/db/queries/plant";
import { listRuleRows } from "@/db/queries/rule-rows";
import { listRuleAudit } from "@/db/queries/rule-versions";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { isRuleKind } from "@/lib/vocabulary";
import { can } from "@/lib/permissions";
import { formatPlantTime } from "@/lib/plant-time";
import { LimitsEditor, type RuleInfo } from "./_components/limits-editor";

export const metadata: Metadata = { title: "Limits" };
export const dynamic = "force-dynamic";

export default async function LimitsPage() {
  const { allowed, session } = await requirePagePermission("view", "/limits");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Limits" />
        <Forbidden what="see limits" />
      </div>
    );
  }
  const db = getDb();
  const [layout, rows, audit, plant] = await Promise.all([getPlantLayout(db), listRuleRows(db), listRuleAudit(db, 15), getPlantSettings(db)]);
  const rules: RuleInfo[] = rows.flatMap((r) =>
    isRuleKind(r.kind)
      ? [
          {
            id: r.id,
            kind: r.kind,
            name: r.name,
            pointId: r.pointId,
            lineId: r.lineId,
            areaId: r.areaId,
            scopedElsewhere: r.deviceId !== null || r.neutralizerId !== null,
            enabled: r.enabled,
            currentVersion: r.currentVersion,
            severity: r.severity,
            onDelayS: r.onDelayS,
            offDelayS: r.offDelayS,
            onlyWhileRunning: r.onlyWhileRunning,
            params: r.params && typeof r.params === "object" ? Object.fromEntries(Object.entries(r.params)) : {},
            versionCreatedAt: r.versionCreatedAt,
          },
        ]
      : [],
  );
  const canEdit = can(session.role, "limits.edit");
  const now = Date.now();
  return (
    <div>
      <PageHeader
        title="Limits"
        subtitle={canEdit ? "Set limits per hall, line and point; replay a change over recorded data before you save it." : "The limits behind the alerts, and where each comes from."}
      />
      <LimitsEditor
        tree={layout.map((a) => ({ id: a.id, name: a.name, lines: a.lines.map((l) => ({ id: l.id, name: l.name, points: l.points.map((p) => ({ id: p.id, name: p.name })) })) }))}
        rules={rules}
        canEdit={canEdit}
        timeZone={plant.timeZone}
        nowTs={now}
      />
      <Card title="Latest limit changes (audit log)" className="mt-5">
        {audit.length === 0 ? (
          <p className="text-sm text-ink-faint">No limit has been changed yet.</p>
        ) : (
          <ol className="space-y-1.5 text-sm" data-testid="rule-audit">
            {audit.map((e) => (
              <li key={e.id} className="grid grid-cols-[8rem_9rem_1fr] gap-3">
                <span className="num text-xs text-ink-faint">{formatPlantTime(e.ts, plant.timeZone, "d MMM yyyy HH:mm")}</span>
                <span className="text-ink-soft">{e.personName ?? "—"}</span>
                <span>{e.summary}</span>
              </li>
            ))}
          </ol>
        )}
      </Card>
    </div>
  );
}
