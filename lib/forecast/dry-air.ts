// Tomorrow's dry air (pure): from an hourly outdoor forecast (temperature, RH over water, as
// weather services report it), each hall's expected indoor RH hour by hour when the outdoor air
// is heated to the hall's setpoint without adding moisture (lib/physics/psychrometrics.ts,
// indoorRhAfterHeatingPct), then with the hall's humidifier running at its capacity into the
// hall's airflow, and the water needed to hold the hall at its RH limit. Hours below the limit
// without humidification are grouped into spans, each worded as a warning.
import { formatPlantTime } from "../plant-time";
import { dryAirMassFlowKgPerH, humidifierWaterKgPerH, humidityRatioKgPerKg, indoorRhAfterHeatingPct, rhFromHumidityRatioPct } from "../physics/psychrometrics";

export type ForecastHour = { ts: number; outdoorTempC: number; outdoorRhPct: number };
export type HallForDryAir = { id: number; name: string; tempSetpointC: number; rhMinPct: number; humidifierKgPerH: number; airflowM3PerH: number };

export type HallHour = {
  ts: number;
  /** indoor RH with the outdoor air heated to the setpoint and nothing added */
  rhWithoutPct: number;
  /** the same with the humidifier at full capacity (equal to rhWithoutPct when the hall has none) */
  rhWithPct: number;
  /** water needed to bring the hall up to its RH limit, kg/h (0 when it is not below) */
  waterNeededKgPerH: number;
};

export type DryAirSpan = {
  hallId: number;
  hallName: string;
  fromTs: number;
  /** end of the last hour in the span (exclusive) */
  toTs: number;
  minRhWithoutPct: number;
  maxRhWithoutPct: number;
  minRhWithPct: number;
  limitPct: number;
  maxWaterNeededKgPerH: number;
  humidifierKgPerH: number;
  /** true when the humidifier at full capacity still leaves the hall below its limit */
  humidifierShort: boolean;
};

/** The expected indoor RH of one hall for one forecast hour. */
export function hallHour(hall: HallForDryAir, h: ForecastHour): HallHour {
  const rhWithoutPct = indoorRhAfterHeatingPct({ outdoorTempC: h.outdoorTempC, outdoorRhPct: h.outdoorRhPct, indoorTempC: hall.tempSetpointC, basis: "water" });
  let rhWithPct = rhWithoutPct;
  if (hall.humidifierKgPerH > 0 && hall.airflowM3PerH > 0) {
    // the humidifier's water spread over the dry air of the hall's airflow raises W
    const dryAir = dryAirMassFlowKgPerH(hall.airflowM3PerH, hall.tempSetpointC, rhWithoutPct);
    const w = humidityRatioKgPerKg(hall.tempSetpointC, rhWithoutPct) + hall.humidifierKgPerH / dryAir;
    rhWithPct = Math.min(100, rhFromHumidityRatioPct(hall.tempSetpointC, w));
  }
  const waterNeededKgPerH =
    rhWithoutPct < hall.rhMinPct && hall.airflowM3PerH > 0
      ? humidifierWaterKgPerH({ airflowM3PerH: hall.airflowM3PerH, indoorTempC: hall.tempSetpointC, fromRhPct: rhWithoutPct, toRhPct: hall.rhMinPct })
      : 0;
  return { ts: h.ts, rhWithoutPct, rhWithPct, waterNeededKgPerH };
}

/** Hours of [fromTs, toTs) whose RH without humidification is below the hall's limit, as contiguous spans. */
export function dryAirSpans(hall: HallForDryAir, hours: readonly ForecastHour[], fromTs: number, toTs: number): DryAirSpan[] {
  const spans: DryAirSpan[] = [];
  let cur: DryAirSpan | null = null;
  for (const h of [...hours].filter((x) => x.ts >= fromTs && x.ts < toTs).sort((a, b) => a.ts - b.ts)) {
    const r = hallHour(hall, h);
    if (r.rhWithoutPct >= hall.rhMinPct) {
      cur = null;
      continue;
    }
    if (!cur || cur.toTs !== h.ts) {
      cur = {
        hallId: hall.id,
        hallName: hall.name,
        fromTs: h.ts,
        toTs: h.ts + 3_600_000,
        minRhWithoutPct: r.rhWithoutPct,
        maxRhWithoutPct: r.rhWithoutPct,
        minRhWithPct: r.rhWithPct,
        limitPct: hall.rhMinPct,
        maxWaterNeededKgPerH: r.waterNeededKgPerH,
        humidifierKgPerH: hall.humidifierKgPerH,
        humidifierShort: r.rhWithPct < hall.rhMinPct,
      };
      spans.push(cur);
      continue;
    }
    cur.toTs = h.ts + 3_600_000;
    cur.minRhWithoutPct = Math.min(cur.minRhWithoutPct, r.rhWithoutPct);
    cur.maxRhWithoutPct = Math.max(cur.maxRhWithoutPct, r.rhWithoutPct);
    cur.minRhWithPct = Math.min(cur.minRhWithPct, r.rhWithPct);
    cur.maxWaterNeededKgPerH = Math.max(cur.maxWaterNeededKgPerH, r.waterNeededKgPerH);
    cur.humidifierShort ||= r.rhWithPct < hall.rhMinPct;
  }
  return spans;
}

/** "Thu 05:00–10:00: Press Hall expected 19–24 % RH without humidification, below the 30 % limit; about 64 kg/h of water needed" (+ what the humidifier does). */
export function describeDryAirSpan(s: DryAirSpan, timeZone: string): string {
  const lo = Math.floor(s.minRhWithoutPct);
  // rounded up, but never to the limit itself ("7–40 %, below the 40 % limit" would read wrong)
  const hi = Math.ceil(s.maxRhWithoutPct) >= s.limitPct ? Math.floor(s.maxRhWithoutPct) : Math.ceil(s.maxRhWithoutPct);
  const range = lo === hi ? `${lo}` : `${lo}–${hi}`;
  const when = `${formatPlantTime(s.fromTs, timeZone, "EEE HH:mm")}–${formatPlantTime(s.toTs, timeZone, "HH:mm")}`;
  const water = Math.round(s.maxWaterNeededKgPerH);
  let text = `${when}: ${s.hallName} expected ${range} % RH without humidification, below the ${s.limitPct} % limit; about ${water} kg/h of water needed`;
  if (s.humidifierKgPerH > 0) {
    text += s.humidifierShort
      ? `; the ${s.humidifierKgPerH} kg/h humidifier at full output still leaves it at ${Math.floor(s.minRhWithPct)} %`
      : `; the ${s.humidifierKgPerH} kg/h humidifier can hold it at the limit`;
  } else text += "; the hall has no humidifier";
  return text;
}
