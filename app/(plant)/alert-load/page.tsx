// Alert load: how many alerts the plant raises, set against the published benchmarks of alarm
// management (EEMUA 191, ANSI/ISA-18.2): alerts per 10 minutes and per day, floods, chattering,
// standing alerts, and the ten noisiest rules with their share — the places to tune first.
import type { Metadata } from "next";
import Link from "next/link";
import clsx from "clsx";
import { requirePagePermission } from "@/app/_server/session";
import { getDb } from "@/db/client";
import {
  BENCHMARK_ACCEPTABLE_PER_10_MIN,
  BENCHMARK_ACCEPTABLE_PER_DAY,
  BENCHMARK_ACCEPTABLE_PER_HOUR,
  BENCHMARK_MANAGEABLE_PER_DAY,
  BENCHMARK_MANAGEABLE_PER_HOUR,
  CHATTER_RAISES,
  CHATTER_SPAN_MS,
  BENCHMARK_FLOOD_TIME_FRACTION,
  BENCHMARK_MANAGEABLE_PER_10_MIN,
  FLOOD_PER_10_MIN,
  type AlertLoad,
} from "@/lib/alert-load";
import { getAlertLoad } from "@/db/queries/alert-load";
import { getPlantSettings } from "@/db/queries/equipment";
import { loadPlantTopology } from "@/db/queries/topology";
import { RULE_KIND_WORDS } from "@/lib/vocabulary";
import { formatDuration } from "@/lib/vocabulary";
import { Card, Forbidden, PageHeader } from "@/components/ui/page";
import { formatPlantTime } from "@/lib/plant-time";
import { PerDayBars, Per10MinChart } from "./_components/load-charts";

export const metadata: Metadata = { title: "Alert load" };
export const dynamic = "force-dynamic";

const SPANS = [
  { days: 1, label: "24 hours" },
  { days: 7, label: "7 days" },
  { days: 30, label: "30 days" },
];

const VERDICT: Record<AlertLoad["verdict"], { word: string; tone: string; text: string }> = {
  acceptable: { word: "Very likely acceptable", tone: "border-paper-line bg-paper-raised", text: `About ${BENCHMARK_ACCEPTABLE_PER_10_MIN} alert per 10 minutes or fewer on average.` },
  manageable: { word: "Manageable", tone: "border-paper-line bg-paper-raised", text: `Between ${BENCHMARK_ACCEPTABLE_PER_10_MIN} and ${BENCHMARK_MANAGEABLE_PER_10_MIN} alerts per 10 minutes on average.` },
  overloaded: {
    word: "Overloaded",
    tone: "border-over/40 bg-over-soft",
    text: `In flood ${BENCHMARK_FLOOD_TIME_FRACTION * 100} % of the time or more, or more than ${BENCHMARK_MANAGEABLE_PER_10_MIN} alerts per 10 minutes on average: people cannot keep up.`,
  },
};

export default async function AlertLoadPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const { allowed } = await requirePagePermission("view", "/alert-load");
  if (!allowed) {
    return (
      <div>
        <PageHeader title="Alert load" />
        <Forbidden what="see the alert load" />
      </div>
    );
  }
  const sp = await searchParams;
  const daysParam = Array.isArray(sp.days) ? sp.days[0] : sp.days;
  const days = SPANS.find((s) => String(s.days) === daysParam)?.days ?? 30;
  const db = getDb();
  const now = Date.now();
  const to = Math.ceil(now / 600_000) * 600_000;
  const from = to - days * 86_400_000;
  const [load, plant, topo] = await Promise.all([getAlertLoad(db, from, to, now), getPlantSettings(db), loadPlantTopology(db)]);
  const where = (subjectKey: string) => topo.subjects.get(subjectKey)?.where ?? subjectKey;
  const verdict = VERDICT[load.verdict];
  const floodPct = load.floodTimeFraction * 100;

  return (
    <div>
      <PageHeader
        title="Alert load"
        subtitle="How many alerts Stillfield raises, against the published figures of alarm management (EEMUA 191 3rd edition 2013, ANSI/ISA-18.2-2016, IEC 62682:2022)."
        actions={
          <nav className="flex gap-1 text-sm" aria-label="Span">
            {SPANS.map((s) => (
              <Link
                key={s.days}
                href={`/alert-load?days=${s.days}`}
                aria-current={s.days === days ? "page" : undefined}
                className={clsx("rounded px-2.5 py-1.5", s.days === days ? "bg-brand text-white" : "border border-paper-line bg-paper-raised text-ink-soft hover:bg-paper-sunk")}
              >
                {s.label}
              </Link>
            ))}
          </nav>
        }
      />

      <div className="mb-5 grid gap-3 md:grid-cols-[minmax(0,20rem)_1fr]">
        <div className={clsx("rounded-card border px-4 py-3", verdict.tone)} data-testid="load-verdict" data-verdict={load.verdict}>
          <div className="text-xs font-medium text-ink-soft">Average over the last {SPANS.find((s) => s.days === days)?.label}</div>
          <div className="num mt-1 text-3xl font-semibold text-ink">{load.averagePer10Min === 0 ? "0" : load.averagePer10Min < 0.01 ? "< 0.01" : load.averagePer10Min.toFixed(2)}</div>
          <div className="text-sm text-ink-soft">alerts per 10 minutes</div>
          <div className="mt-2 text-sm font-semibold text-ink">{verdict.word}</div>
          <div className="text-xs text-ink-soft">{verdict.text}</div>
        </div>
        <div className="grid grid-cols-2 gap-3 lg:grid-cols-3">
          <Figure label="Alerts raised" value={String(load.total)} note={`${load.averagePerDay.toFixed(1)} a day (busiest ${load.peakPerDay}); benchmark about ${BENCHMARK_ACCEPTABLE_PER_DAY}, at most ${BENCHMARK_MANAGEABLE_PER_DAY}`} />
          <Figure label="Per hour" value={load.averagePerHour.toFixed(2)} note={`busiest hour ${load.peakPerHour}; benchmark about ${BENCHMARK_ACCEPTABLE_PER_HOUR}, at most ${BENCHMARK_MANAGEABLE_PER_HOUR}`} warn={load.peakPerHour > BENCHMARK_MANAGEABLE_PER_HOUR} />
          <Figure label="Busiest 10 minutes" value={String(load.peakPer10Min)} note={load.peakPer10Min > FLOOD_PER_10_MIN ? "a flood" : "no flood"} warn={load.peakPer10Min > FLOOD_PER_10_MIN} />
          <Figure
            label="Time in flood"
            value={`${floodPct.toFixed(floodPct < 1 ? 2 : 1)} %`}
            note={`target under ${BENCHMARK_FLOOD_TIME_FRACTION * 100} %`}
            warn={load.floodTimeFraction >= BENCHMARK_FLOOD_TIME_FRACTION}
          />
          <Figure label="Floods" value={String(load.floods.length)} note={`more than ${FLOOD_PER_10_MIN} alerts in any 10 min (sliding)`} />
          <Figure label="Chattering alerts" value={String(load.chatteringRules.length)} note={`raised ${CHATTER_RAISES} times or more within ${CHATTER_SPAN_MS / 60_000} min; target none`} warn={load.chatteringRules.length > 0} />
          <Figure label="Standing over 24 h" value={String(load.standing.length)} note="still active now" warn={load.standing.length > 0} />
        </div>
      </div>

      <Card title="Alerts per 10 minutes" className="mb-5">
        <Per10MinChart load={load} timeZone={plant.timeZone} />
      </Card>

      <div className="grid gap-5 xl:grid-cols-2">
        <Card title="Ten noisiest alerts" aside={<span className="text-xs text-ink-faint">rule and place, share of all alerts raised</span>}>
          {load.noisiest.length === 0 ? (
            <p className="text-sm text-ink-faint">No alerts in this span.</p>
          ) : (
            <table className="w-full text-sm" data-testid="noisiest">
              <tbody>
                {load.noisiest.map((r) => (
                  <tr key={`${r.ruleId}-${r.subjectKey}`} className="border-t border-paper-line first:border-0">
                    <td className="py-1.5 pr-2">
                      <div className="font-medium">{r.ruleName ?? `Rule ${r.ruleId}`}</div>
                      <div className="text-xs text-ink-faint">
                        {where(r.subjectKey)}
                        {r.ruleName && r.ruleName !== RULE_KIND_WORDS[r.kind] ? ` · ${RULE_KIND_WORDS[r.kind]}` : ""}
                      </div>
                    </td>
                    <td className="w-40 py-1.5 pr-2">
                      <span className="block h-2.5 rounded-sm bg-paper-sunk">
                        <span className="block h-2.5 rounded-sm bg-ink-soft" style={{ width: `${r.share * 100}%` }} />
                      </span>
                    </td>
                    <td className="num w-24 py-1.5 text-right">
                      {r.count} · {(r.share * 100).toFixed(0)} %
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          <p className="mt-3 text-xs text-ink-faint">
            Tune the top of this list first in <Link href="/limits" className="text-brand hover:underline">Limits</Link> (replay a change before saving it).
          </p>
        </Card>
        <Card title="Alerts per day">
          <PerDayBars load={load} timeZone={plant.timeZone} />
        </Card>
        <Card title="Floods">
          {load.floods.length === 0 ? (
            <p className="text-sm text-ink-faint">No flood in this span: never more than {FLOOD_PER_10_MIN} alerts in 10 minutes.</p>
          ) : (
            <ul className="space-y-1 text-sm">
              {load.floods.map((f) => (
                <li key={f.startTs} className="num">
                  {formatPlantTime(f.startTs, plant.timeZone, "d MMM HH:mm")}–{formatPlantTime(f.endTs, plant.timeZone, "HH:mm")}: {f.count} alerts in {formatDuration(f.endTs - f.startTs)}
                </li>
              ))}
            </ul>
          )}
        </Card>
        <Card title="Chattering and standing alerts">
          {load.chatteringRules.length === 0 && load.standing.length === 0 ? <p className="text-sm text-ink-faint">None.</p> : null}
          {load.chatteringRules.length > 0 ? (
            <>
              <h3 className="mb-1 text-xs font-semibold uppercase tracking-wide text-ink-faint">Chattering (rule and place)</h3>
              <ul className="mb-3 space-y-1 text-sm">
                {load.chatteringRules.map((c) => (
                  <li key={`${c.ruleId}-${c.subjectKey}`}>
                    <span className="num font-medium">{c.count}×</span> {c.ruleName ?? `Rule ${c.ruleId}`} — {where(c.subjectKey)}
                  </li>
                ))}
              </ul>
            </>
          ) : null}
          {load.standing.length > 0 ? (
            <>
              <h3 className="mb-1 text-xs font-semibold uppercase tracking-wide text-ink-faint">Standing more than 24 hours</h3>
              <ul className="space-y-1 text-sm">
                {load.standing.map((s) => (
                  <li key={s.id}>
                    {s.ruleName ?? RULE_KIND_WORDS[s.kind]} — {where(s.subjectKey)} <span className="text-ink-faint">since {formatPlantTime(s.startTs, plant.timeZone, "d MMM HH:mm")}</span>
                  </li>
                ))}
              </ul>
            </>
          ) : null}
        </Card>
      </div>

      <p className="mt-5 text-xs leading-relaxed text-ink-faint">
        Benchmarks, as published for operators of process plants (EEMUA Publication 191, 3rd edition, 2013; ANSI/ISA-18.2-2016 and its international counterpart IEC 62682:2022; quoted from memory): an average of about 1 alarm per 10 minutes is
        &ldquo;very likely acceptable&rdquo; and about 2 &ldquo;manageable&rdquo;; more than 10 alarms in 10 minutes is a flood, and a plant should be in flood less than 1 %
        of the time; about 6 per hour and 150 per day are very likely acceptable, 12 and 300 the most manageable; chattering alarms should be none, and the ten most
        frequent alarms should make up only a small share of the total. Stillfield&apos;s alerts are counted the same way (every raise counts once, floods in a sliding
        10-minute window, chattering as {CHATTER_RAISES} raises of one alert within {CHATTER_SPAN_MS / 60_000} minutes whatever its delays), and &ldquo;overloaded&rdquo; means in
        flood 1 % of the time or more, or above 2 per 10 minutes on average.
      </p>
      <p className="mt-2 text-xs leading-relaxed text-ink-faint" data-testid="load-scope-note">
        These figures are for the whole plant. The published figures are per operator position (one person&apos;s console); where several people share the alerts, each
        one&apos;s load is lower than the plant&apos;s, so read the verdict as the plant-wide, stricter case.
      </p>
    </div>
  );
}

function Figure({ label, value, note, warn }: { label: string; value: string; note?: string; warn?: boolean }) {
  return (
    <div className={clsx("rounded-card border px-3 py-2.5", warn ? "border-near/40 bg-near-soft" : "border-paper-line bg-paper-raised")}>
      <div className="text-xs font-medium text-ink-soft">{label}</div>
      <div className="num mt-0.5 text-2xl font-semibold text-ink">{value}</div>
      {note ? <div className="text-xs text-ink-faint">{note}</div> : null}
    </div>
  );
}
