// The survey report's body, for the page and for print: the line sketch in web-path order, each
// spot's reading with its equivalent, limit, reduction and fixed-meter value, and photos.
import clsx from "clsx";
import { StateBadge } from "@/components/ui/state-badge";
import { valueState } from "@/lib/point-state";
import { fmtKv } from "@/lib/surveys/round-view";
import type { SurveyReport } from "@/lib/surveys/types";

type Spot = SurveyReport["spots"][number];

const stateOf = (s: Spot) => (s.reading ? valueState(s.reading.equivalentKv, s.limitKv !== null ? { direction: "high", limit: s.limitKv } : null) : null);

export function LineSketch({ spots }: { spots: Spot[] }) {
  return (
    <ol className="flex flex-wrap items-stretch gap-y-2" aria-label="Line in web-path order" data-testid="line-sketch">
      {spots.map((s, i) => {
        const st = stateOf(s);
        return (
          <li key={s.key} className="flex items-center">
            {i > 0 ? (
              <span className="flex flex-col items-center px-1 text-ink-faint" aria-hidden={!s.afterNeutralizer}>
                {s.afterNeutralizer ? (
                  <span className="rounded-sm bg-ink-soft px-1 text-[10px] font-medium text-white" title={`Neutralizer ${s.afterNeutralizer}`}>
                    ▮ {s.afterNeutralizer}
                  </span>
                ) : null}
                <span>→</span>
              </span>
            ) : null}
            <span className={clsx("rounded border px-2 py-1 text-xs", st === "over" ? "border-over/50 bg-over-soft" : st === "near" ? "border-near/40 bg-near-soft" : "border-paper-line bg-paper-raised")}>
              <span className="block font-medium text-ink">{s.name}</span>
              <span className="num block">{s.reading ? fmtKv(s.reading.equivalentKv) : "—"}</span>
              {s.reductionPct !== null ? <span className="block text-ink-soft">{Math.round(s.reductionPct)} % less</span> : null}
            </span>
          </li>
        );
      })}
    </ol>
  );
}

export function SpotReadings({ report }: { report: SurveyReport }) {
  return (
    <ol className="divide-y divide-paper-line" data-testid="report-readings">
      {report.spots.map((s) => {
        const r = s.reading;
        const st = stateOf(s);
        return (
          <li key={s.key} className="flex flex-wrap gap-x-4 gap-y-1 py-2 text-sm" data-testid="report-spot" data-spot={s.key}>
            <div className="min-w-0 flex-1 basis-48">
              <p className="font-medium text-ink">
                {s.position}. {s.name}
                {s.afterNeutralizer ? <span className="font-normal text-ink-soft"> · after {s.afterNeutralizer}</span> : null}
              </p>
              {r ? (
                <p className="text-xs text-ink-faint">
                  read {r.enteredValue > 0 ? "+" : ""}
                  {r.enteredValue} {r.unit} at {r.distanceMm} mm · {r.running ? `running${r.speedMpm !== null ? ` ${r.speedMpm} m/min` : ""}` : "stopped"}
                  {r.note ? ` · ${r.note}` : ""}
                </p>
              ) : (
                <p className="text-xs text-ink-faint">not measured</p>
              )}
            </div>
            {r ? (
              <div className="text-right">
                <p className={clsx("num font-semibold", r.equivalentKv >= 0 ? "text-pos" : "text-neg")}>{fmtKv(r.equivalentKv)}</p>
                <p className="text-xs text-ink-faint">
                  at {report.calibratedDistanceMm} mm{s.limitKv !== null ? ` · limit ${s.limitKv} kV` : ""}
                </p>
                {st ? <StateBadge state={st} /> : null}
              </div>
            ) : null}
            {r && (s.reductionPct !== null || r.fixedKv !== null || r.photoId) ? (
              <div className="w-full space-y-0.5 text-xs text-ink-soft">
                {s.reductionPct !== null ? <p className={s.reductionPct < 50 ? "font-medium text-over" : ""}>Reduction across {s.afterNeutralizer}: {Math.round(s.reductionPct)} %</p> : null}
                {r.fixedKv !== null ? <p>Fixed meter {r.fixedCode ?? ""} at the same moment: {fmtKv(r.fixedKv)}</p> : null}
                {r.photoId ? (
                  // eslint-disable-next-line @next/next/no-img-element -- a permission-checked route, not a static asset
                  <img src={`/api/surveys/photos/${r.photoId}?variant=thumb`} alt={`Photo at ${s.name}`} className="mt-1 max-h-40 rounded border border-paper-line" />
                ) : null}
              </div>
            ) : null}
          </li>
        );
      })}
    </ol>
  );
}
