/**
 * Scores alerts against ground truth (`npm run bench:alerts`, simulators/ground-truth.ts).
 *
 * - An alert belongs to an incident when its subject is one of the incident's subjects and it
 *   was raised between MATCH_BEFORE_MS before the incident's start and MATCH_AFTER_MS after its end.
 * - Recall: of the incidents that reached trouble, the share alerted at or before the trouble moment.
 * - Lead: trouble moment minus the first alert, for the incidents alerted in time.
 * - False alerts: alerts that belong to no incident, per line-week.
 * - Alerts per incident: alerts that belong to incidents, over the incidents that got any.
 * - Floods: spells with more than 10 alerts in a sliding 10 minutes (lib/alert-load.ts).
 *
 * Only the alerts people were told of count: held alerts (behind a silent gateway, in a
 * maintenance window) are not alerts here.
 */
import { findFloods } from "../alert-load";

export const MATCH_BEFORE_MS = 10 * 60_000;
export const MATCH_AFTER_MS = 30 * 60_000;
const WEEK_MS = 7 * 86_400_000;

export type ScoredIncident = { id: string; kind: string; subjectKeys: readonly string[]; startMs: number; troubleMs: number | null; endMs: number };
export type ScoredAlert = { subjectKey: string; raisedTs: number };

export type IncidentOutcome = { id: string; kind: string; alerts: number; firstAlertTs: number | null; troubleMs: number | null; intime: boolean; leadMin: number | null };

export type AlertScore = {
  incidents: number;
  withTrouble: number;
  recall: number;
  /** median lead over all incidents alerted in time, and per kind, minutes */
  medianLeadMin: number | null;
  medianLeadMinByKind: Record<string, number | null>;
  falseAlerts: number;
  falsePerLineWeek: number;
  alertsPerIncident: number;
  floods: number;
  outcomes: IncidentOutcome[];
  unmatched: ScoredAlert[];
};

export function median(xs: readonly number[]): number | null {
  if (xs.length === 0) return null;
  const s = [...xs].sort((a, b) => a - b);
  const m = Math.floor(s.length / 2);
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

export function scoreAlerts(incidents: readonly ScoredIncident[], alerts: readonly ScoredAlert[], lineCount: number, spanMs: number): AlertScore {
  const matched = new Set<number>();
  const outcomes: IncidentOutcome[] = incidents.map((inc) => {
    const subjects = new Set(inc.subjectKeys);
    const mine: number[] = [];
    alerts.forEach((a, i) => {
      if (!subjects.has(a.subjectKey)) return;
      if (a.raisedTs < inc.startMs - MATCH_BEFORE_MS || a.raisedTs > inc.endMs + MATCH_AFTER_MS) return;
      mine.push(i);
      matched.add(i);
    });
    const firstAlertTs = mine.length ? Math.min(...mine.map((i) => alerts[i].raisedTs)) : null;
    const intime = inc.troubleMs !== null && firstAlertTs !== null && firstAlertTs <= inc.troubleMs;
    return {
      id: inc.id,
      kind: inc.kind,
      alerts: mine.length,
      firstAlertTs,
      troubleMs: inc.troubleMs,
      intime,
      leadMin: intime ? (inc.troubleMs! - firstAlertTs!) / 60_000 : null,
    };
  });
  const withTrouble = outcomes.filter((o) => o.troubleMs !== null);
  const alerted = outcomes.filter((o) => o.alerts > 0);
  const unmatched = alerts.filter((_, i) => !matched.has(i));
  const kinds = [...new Set(outcomes.map((o) => o.kind))];
  const leads = (list: IncidentOutcome[]) => list.filter((o) => o.leadMin !== null).map((o) => o.leadMin!);
  return {
    incidents: incidents.length,
    withTrouble: withTrouble.length,
    recall: withTrouble.length ? withTrouble.filter((o) => o.intime).length / withTrouble.length : 1,
    medianLeadMin: median(leads(outcomes)),
    medianLeadMinByKind: Object.fromEntries(kinds.map((k) => [k, median(leads(outcomes.filter((o) => o.kind === k)))])),
    falseAlerts: unmatched.length,
    falsePerLineWeek: unmatched.length / Math.max(1e-9, lineCount * (spanMs / WEEK_MS)),
    alertsPerIncident: alerted.length ? alerted.reduce((s, o) => s + o.alerts, 0) / alerted.length : 0,
    floods: findFloods(alerts.map((a) => a.raisedTs).sort((a, b) => a - b)).length,
    outcomes,
    unmatched,
  };
}
