"use client";
// Charge reading explainer: what a field-meter reading means for the surface, the air and people.
import { useMemo, useState } from "react";
import { fieldMessages } from "./number-input";
import { explainCharge, explainerSchema, PERCEPTION_SHORT, type ExplainerFields } from "./charge-explainer-model";
import { TRADE_FACTS } from "./trade-facts";
import { Answer, CalcCard, Caution, FieldGrid, Method, NumberInput, Presets, Results } from "./calc-ui";

export function ChargeExplainer() {
  const [fields, setFields] = useState<ExplainerFields>({ readingKv: "-12.5", distanceMm: "25" });
  const set = (k: keyof ExplainerFields) => (v: string) => setFields((p) => ({ ...p, [k]: v }));
  const parsed = useMemo(() => explainerSchema.safeParse(fields), [fields]);
  const errors = parsed.success ? {} : fieldMessages(parsed.error.issues);
  const r = parsed.success ? explainCharge(parsed.data) : null;
  const share = r ? Math.min(1, r.breakdownShare) : 0;

  return (
    <CalcCard id="charge" title="Charge reading explainer" purpose="What a field-meter reading says about the surface, how close it is to what air can hold, and whether people would feel it.">
      <Presets
        label="Try:"
        items={[
          { key: "neutralized", label: "Neutralized web, 2 kV", onPick: () => setFields({ readingKv: "2", distanceMm: "25" }) },
          { key: "rubbed", label: "Rubbed plastic sheet, 12 kV", onPick: () => setFields({ readingKv: "12", distanceMm: "25" }) },
          { key: "unwind", label: "Dry unwind, −35 kV", onPick: () => setFields({ readingKv: "-35", distanceMm: "25" }) },
        ]}
      />
      <FieldGrid>
        <NumberInput id="readingKv" label="Meter reading (with its sign)" unit="kV" value={fields.readingKv} onChange={set("readingKv")} error={errors.readingKv} hint="As the meter shows it, e.g. −12.5" />
        <NumberInput id="distanceMm" label="Distance from meter to surface" unit="mm" value={fields.distanceMm} onChange={set("distanceMm")} error={errors.distanceMm} hint="The distance the meter is calibrated for, usually 25 mm" />
      </FieldGrid>

      {r ? (
        <>
          <Answer tone={r.impossible ? "over" : r.breakdownShare >= 0.5 || r.perception === "seen" ? "near" : "normal"} testId="charge-answer">
            {r.words}
          </Answer>
          <div aria-label="Share of the air-breakdown ceiling" className="space-y-1">
            <div className="flex justify-between text-xs text-ink-faint">
              <span>0</span>
              <span>share of what air can hold ({r.maxReadingKv.toFixed(0)} kV at this distance)</span>
              <span>100 %</span>
            </div>
            <div className="relative h-2.5 rounded-full bg-paper-sunk">
              <div className={`absolute inset-y-0 left-0 rounded-full ${r.impossible ? "bg-over" : r.breakdownShare >= 0.5 ? "bg-near" : "bg-brand"}`} style={{ width: `${Math.max(1, share * 100)}%` }} />
            </div>
          </div>
          <Results
            rows={[
              { label: "Field at the surface", value: `${(r.fieldVPerM / 1e5).toFixed(2)} kV/cm`, note: `${Math.round(r.fieldVPerM).toLocaleString("en-GB")} V/m`, testId: "field" },
              { label: "Surface charge density", value: `${r.surfaceChargeUcPerM2.toFixed(2).replace("-", "\u2212")} µC/m²`, note: "single-sided (web over earthed metal)", testId: "sigma" },
              { label: "Share of breakdown ceiling", value: `${(r.breakdownShare * 100).toFixed(1)} %`, note: "3 MV/m, about 26.5 µC/m²", testId: "share" },
              { label: "A person charged to this level", value: PERCEPTION_SHORT[r.perception], note: "felt ~2–3 kV · heard ~5 kV · seen ~8–10 kV (common practice)", testId: "perception" },
            ]}
          />
        </>
      ) : (
        <Answer tone="muted">Correct the marked fields to see the answer.</Answer>
      )}

      <div className="rounded border border-paper-line bg-paper px-3 py-2 text-xs text-ink-soft">
        <p className="mb-1 font-medium text-ink">What the trade knows (common practice)</p>
        <ul className="list-disc space-y-0.5 pl-5">
          {TRADE_FACTS.map((t) => (
            <li key={t}>{t}</li>
          ))}
        </ul>
      </div>

      <Method
        formula={
          <>
            E = |V| / d &nbsp;·&nbsp; σ = ε0 · E &nbsp;(ε0 = 8.854×10⁻¹² F/m)
            <br />share = E / 3 MV/m &nbsp;·&nbsp; σmax = ε0 · 3 MV/m ≈ 26.5 µC/m² &nbsp;·&nbsp; Vmax = 3 MV/m · d
          </>
        }
        source="Gauss's law for a large charged sheet; air breakdown about 3 MV/m and the ceiling of about 26.5 µC/m² as used in NFPA 77 and IEC TS 60079-32-1; perception thresholds common practice."
        assumptions={[
          "The meter reads a large flat surface (wide compared with the distance) in front of earthed metal, so the field lines leave one side: σ = ε0·E. A sheet charged in free air carries twice that.",
          "Narrow or curved targets read low; a reading at another distance than the calibrated one is wrong in proportion.",
          "How a discharge feels depends on the person, the contact and the body's capacitance (about 100–300 pF); the thresholds are typical, not limits.",
        ]}
      />
      <Caution title="Shocks are a hazard, too">
        A charged person or conductor near solvent vapour is an ignition source: use the spark-hazard check below, and have solvent areas assessed by a qualified person under <span className="whitespace-nowrap">NFPA 77</span>, <span className="whitespace-nowrap">IEC TS 60079-32-1</span> and local codes. Stillfield is a monitoring aid, not a safety system.
      </Caution>
    </CalcCard>
  );
}
