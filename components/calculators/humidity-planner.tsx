"use client";
// Humidity planner: outdoor winter air → indoor RH → water needed for the target RH.
import { useMemo, useState } from "react";
import { fieldMessages } from "./number-input";
import { planHumidity, plannerSchema, type PlannerFields } from "./humidity-planner-model";
import { Answer, CalcCard, FieldGrid, Method, NumberInput, Presets, Results, SelectInput } from "./calc-ui";

export type HallPreset = { id: number; name: string; tempSetpointC: number; airflowM3PerH: number; humidifierKgPerH: number; rhMinPct: number; rhMaxPct: number };

const f = (v: number, d = 1) => v.toFixed(d).replace("-", "\u2212");

export function HumidityPlanner({ halls }: { halls: HallPreset[] }) {
  const first = halls.find((h) => h.airflowM3PerH > 0);
  const [fields, setFields] = useState<PlannerFields>({
    outdoorTempC: "-10",
    outdoorRhPct: "80",
    basis: "water",
    indoorTempC: String(first?.tempSetpointC ?? 21),
    targetRhPct: "45",
    airflowM3PerH: String(first?.airflowM3PerH ?? 9000),
    flowAt: "outdoor",
    humidifierKgPerH: first ? String(first.humidifierKgPerH) : "",
  });
  const [hall, setHall] = useState<string | null>(first?.name ?? null);
  const set = (k: keyof PlannerFields) => (v: string) => {
    setFields((p) => ({ ...p, [k]: v }));
    if (k === "indoorTempC" || k === "airflowM3PerH" || k === "humidifierKgPerH") setHall(null);
  };
  const parsed = useMemo(() => plannerSchema.safeParse(fields), [fields]);
  const errors = parsed.success ? {} : fieldMessages(parsed.error.issues);
  const result = useMemo(() => {
    if (!parsed.success) return null;
    try {
      return planHumidity(parsed.data);
    } catch (err) {
      return { error: err instanceof Error ? err.message : "These inputs cannot be computed." } as const;
    }
  }, [parsed]);

  return (
    <CalcCard id="humidity" title="Humidity planner" purpose="How dry will the hall get when cold outdoor air is heated, and how much water does it take to reach the target?">
      <Presets
        label="Hall:"
        items={halls.map((h) => ({
          key: String(h.id),
          label: h.name,
          onPick: () => {
            setFields((p) => ({ ...p, indoorTempC: String(h.tempSetpointC), airflowM3PerH: String(h.airflowM3PerH), humidifierKgPerH: String(h.humidifierKgPerH), targetRhPct: String(h.rhMinPct + 5) }));
            setHall(h.name);
          },
        }))}
      />
      <FieldGrid>
        <NumberInput id="outdoorTempC" label="Outdoor temperature" unit="°C" value={fields.outdoorTempC} onChange={set("outdoorTempC")} error={errors.outdoorTempC} hint="From the weather forecast or an outdoor sensor" />
        <NumberInput id="outdoorRhPct" label="Outdoor relative humidity" unit="%" value={fields.outdoorRhPct} onChange={set("outdoorRhPct")} error={errors.outdoorRhPct} />
        <SelectInput
          id="basis"
          label="Outdoor RH below 0 °C is read"
          value={fields.basis}
          onChange={set("basis")}
          error={errors.basis}
          hint="Weather services and most hygrometers: over water. ASHRAE tables: over ice."
        >
          <option value="water">Over water (forecasts, hygrometers)</option>
          <option value="ice">Over ice (ASHRAE tables)</option>
        </SelectInput>
        <NumberInput id="indoorTempC" label="Hall temperature" unit="°C" value={fields.indoorTempC} onChange={set("indoorTempC")} error={errors.indoorTempC} hint={hall ? `${hall} setpoint` : undefined} />
        <NumberInput id="targetRhPct" label="Target RH in the hall" unit="%" value={fields.targetRhPct} onChange={set("targetRhPct")} error={errors.targetRhPct} />
        <NumberInput id="airflowM3PerH" label="Outdoor air brought in" unit="m³/h" value={fields.airflowM3PerH} onChange={set("airflowM3PerH")} error={errors.airflowM3PerH} hint="Fresh-air flow of the hall's ventilation" />
        <SelectInput
          id="flowAt"
          label="The air flow is measured"
          value={fields.flowAt}
          onChange={set("flowAt")}
          error={errors.flowAt}
          hint="Cold air is denser: the same m³/h carries about 10 % more air at −10 °C outdoors than in a 21 °C hall."
        >
          <option value="outdoor">At the outdoor intake (cold)</option>
          <option value="hall">At hall conditions (supply air, warm)</option>
        </SelectInput>
        <NumberInput id="humidifierKgPerH" label="Humidifier capacity (optional)" unit="kg/h" value={fields.humidifierKgPerH} onChange={set("humidifierKgPerH")} error={errors.humidifierKgPerH} hint="Leave empty to see only the need" />
      </FieldGrid>

      {result === null ? (
        <Answer tone="muted">Correct the marked fields to see the answer.</Answer>
      ) : "error" in result ? (
        <Answer tone="muted">{result.error}</Answer>
      ) : (
        <>
          <Answer tone={result.condenses ? "near" : result.withHumidifier && result.withHumidifier.shareOfNeed < 1 ? "near" : "normal"} testId="humidity-answer">
            {result.words}
          </Answer>
          <Results
            rows={[
              { label: "Indoor RH after heating", value: `${f(result.indoorRhPct)} %`, note: result.indoorRhOtherBasisPct !== null ? `over ${fields.basis === "water" ? "ice" : "water"} the same figure gives ${f(result.indoorRhOtherBasisPct)} %` : undefined, testId: "indoor-rh" },
              { label: "Water to add", value: `${f(result.waterKgPerH)} kg/h`, testId: "water-kg-per-h" },
              {
                label: "Dry air carried",
                value: `${Math.round(result.dryAirKgPerH).toLocaleString("en-GB")} kg/h`,
                note: `the same m³/h read ${fields.flowAt === "outdoor" ? "in the hall" : "at the outdoor intake"} would be ${Math.round(result.dryAirOtherKgPerH).toLocaleString("en-GB")} kg/h (${f(Math.abs(1 - result.dryAirOtherKgPerH / result.dryAirKgPerH) * 100, 0)} % ${result.dryAirKgPerH > result.dryAirOtherKgPerH ? "less" : "more"})`,
                testId: "dry-air",
              },
              { label: result.outdoorDewIsFrost ? "Outdoor frost point" : "Outdoor dew point", value: `${f(result.outdoorDewPointC)} °C` },
              { label: "Outdoor absolute humidity", value: `${f(result.outdoorAbsoluteGPerM3, 2)} g/m³` },
              { label: "Hall absolute humidity, before", value: `${f(result.indoorAbsoluteGPerM3, 2)} g/m³` },
              { label: "Hall absolute humidity at target", value: `${f(result.targetAbsoluteGPerM3, 2)} g/m³` },
              { label: "Dew point at target", value: `${f(result.targetDewPointC)} °C`, note: "cold surfaces below this sweat" },
              ...(result.withHumidifier ? [{ label: "RH the humidifier reaches", value: `${f(result.withHumidifier.rhReachedPct)} %` }] : []),
            ]}
          />
        </>
      )}

      <Method
        formula={
          <>
            pw = RHout · pws(Tout) &nbsp;·&nbsp; RHin = pw / pws(Tin)
            <br />W = 0.621945 · pw / (p − pw) &nbsp;·&nbsp; ṁda = V̇ / v(T, W where the flow is measured) &nbsp;·&nbsp; ṁwater = ṁda · (Wtarget − Win)
            <br />pws: Hyland–Wexler over water (eq. 6) or over ice (eq. 5); v = Rda·T·(1 + 1.607858·W)/p
          </>
        }
        source="ASHRAE Handbook—Fundamentals 2017 (SI), ch. 1 Psychrometrics, eqs. 5, 6, 20, 22 and 26; checked against the psychrolib package."
        assumptions={[
          "All the air comes in from outside and is heated without adding or removing moisture; people, processes and water-based inks add some, so this is the most water you would need.",
          "RH above 0 °C is always over water. Below 0 °C the two conventions differ by 10–20 % at −10 to −20 °C: use the basis your outdoor figure was measured on.",
          "Sea-level pressure (101 325 Pa); the dry-air mass is taken at the conditions you say the flow is measured at (outdoor intake or hall); the humidifier holds the temperature and all its water evaporates.",
        ]}
      />
    </CalcCard>
  );
}
