"use client";
// Relaxation-time estimate: how long charge stays on a material (τ = ε0·εr·ρ), and its class by
// surface resistance.
import { useMemo, useState } from "react";
import { fieldMessages } from "./number-input";
import { CLASS_WORDS, estimateRelaxation, formatSeconds, relaxationSchema, type RelaxationFields } from "./relaxation-model";
import { Answer, CalcCard, FieldGrid, Method, NumberInput, Presets, Results, SelectInput } from "./calc-ui";

export function RelaxationTime() {
  const [fields, setFields] = useState<RelaxationFields>({ relativePermittivity: "2", resistivity: "1e10", resistivityUnit: "ohm_m", surfaceResistanceOhm: "" });
  const set = (k: keyof RelaxationFields) => (v: string) => setFields((p) => ({ ...p, [k]: v }));
  const parsed = useMemo(() => relaxationSchema.safeParse(fields), [fields]);
  const errors = parsed.success ? {} : fieldMessages(parsed.error.issues);
  const r = parsed.success ? estimateRelaxation(parsed.data) : null;

  return (
    <CalcCard id="relaxation" title="Relaxation-time estimate" purpose="How long does charge stay on a material or liquid before it leaks away on its own?">
      <Presets
        label="Typical (order of magnitude):"
        items={[
          { key: "example", label: "Worked example εr 2, 10¹⁰ Ω·m", onPick: () => setFields((p) => ({ ...p, relativePermittivity: "2", resistivity: "1e10", resistivityUnit: "ohm_m" })) },
          { key: "film", label: "Polyolefin film εr 2.3, 10¹⁶ Ω·m", onPick: () => setFields((p) => ({ ...p, relativePermittivity: "2.3", resistivity: "1e16", resistivityUnit: "ohm_m" })) },
          { key: "toluene", label: "Toluene εr 2.4, 10¹² Ω·m", onPick: () => setFields((p) => ({ ...p, relativePermittivity: "2.4", resistivity: "1e12", resistivityUnit: "ohm_m" })) },
        ]}
      />
      <FieldGrid>
        <NumberInput id="relativePermittivity" label="Relative permittivity εr" value={fields.relativePermittivity} onChange={set("relativePermittivity")} error={errors.relativePermittivity} hint="Plastics about 2–4, water 80" />
        <NumberInput
          id="resistivity"
          label="Volume resistivity ρ"
          unit={fields.resistivityUnit === "ohm_cm" ? "Ω·cm" : "Ω·m"}
          value={fields.resistivity}
          onChange={set("resistivity")}
          error={errors.resistivity}
          hint={r && fields.resistivityUnit === "ohm_cm" ? `= ${r.resistivityOhmM.toExponential(2).replace("e+", "e")} Ω·m (1 Ω·cm = 0.01 Ω·m)` : "Type powers of ten as 1e10 or 10^10"}
        />
        <SelectInput id="resistivityUnit" label="Unit of the resistivity" value={fields.resistivityUnit} onChange={set("resistivityUnit")} error={errors.resistivityUnit} hint="Datasheets usually give Ω·cm; the two differ 100×.">
          <option value="ohm_m">Ω·m (SI)</option>
          <option value="ohm_cm">Ω·cm (datasheets)</option>
        </SelectInput>
        <NumberInput id="surfaceResistanceOhm" label="Surface resistance (optional)" unit="Ω" value={fields.surfaceResistanceOhm} onChange={set("surfaceResistanceOhm")} error={errors.surfaceResistanceOhm} hint="From a surface-resistance meter, e.g. 1e12" />
      </FieldGrid>

      {r ? (
        <>
          <Answer testId="relaxation-answer">{r.words}</Answer>
          <Results
            rows={[
              { label: "Relaxation time τ", value: formatSeconds(r.tauS), note: "charge falls to 37 % (1/e)", testId: "tau" },
              { label: "To 10 % (τ · ln 10)", value: formatSeconds(r.toTenthS) },
              { label: "To 1 % (τ · ln 100)", value: formatSeconds(r.toHundredthS) },
              ...(r.surfaceClass ? [{ label: "Material class", value: r.surfaceClass, note: CLASS_WORDS[r.surfaceClass], testId: "surface-class" }] : []),
            ]}
          />
        </>
      ) : (
        <Answer tone="muted">Correct the marked fields to see the answer.</Answer>
      )}

      <Method
        formula={
          <>
            τ = ε0 · εr · ρ &nbsp;(ε0 = 8.854×10⁻¹² F/m, ρ in Ω·m; 1 Ω·cm = 0.01 Ω·m) &nbsp;·&nbsp; q(t) = q0 · e^(−t/τ)
            <br />class by surface resistance R: &lt; 10⁴ Ω conductive · 10⁴–10¹¹ Ω dissipative · ≥ 10¹¹ Ω insulative
          </>
        }
        source="Charge relaxation as used in NFPA 77 and IEC TS 60079-32-1; surface-resistance classes as in ANSI/ESD S541 (measured per ANSI/ESD STM11.11), other standards draw the lines elsewhere."
        assumptions={[
          "Ohmic conduction through the bulk; charge on a surface also leaks along it, faster in humid air, so a real web in a humid hall loses charge sooner.",
          "The preset values are typical orders of magnitude (from memory); measure the material you have.",
          "Low-conductivity liquids can take longer than Ohm's law suggests to lose the last of their charge (hyperbolic relaxation).",
        ]}
      />
    </CalcCard>
  );
}
