"use client";
// Spark-hazard check for a solvent area: conductor capacitance and voltage → ½CV² → margin to
// the solvent's minimum ignition energy. A screening aid that defers to the standards.
import { useMemo, useState } from "react";
import { COMMON_SOLVENTS, PROPAGATING_BRUSH_CAUTION, SPARK_MARGIN_FACTOR, sparkMarginPhrase, TYPICAL_CAPACITANCES_PF, BRUSH_DISCHARGE_EQUIVALENT_ENERGY_MJ } from "@/lib/physics";
import { StateBadge } from "@/components/ui/state-badge";
import type { PointState } from "@/lib/vocabulary";
import { fieldMessages } from "./number-input";
import { checkSpark, CUSTOM_SOLVENT, sparkSchema, VERDICT_WORDS, type SparkFields } from "./spark-check-model";
import { Answer, CalcCard, Caution, FieldGrid, Method, NumberInput, Presets, Results, SelectInput } from "./calc-ui";

export type SolventLinePreset = { id: number; name: string; solventName: string | null; solventMieMj: number | null; conductorCapacitancePf: number | null };

const VERDICT_STATE: Record<string, PointState> = { "can ignite": "over", "within tenfold of MIE": "near", "below MIE with margin": "normal" };
const sig = (v: number) => (v >= 100 ? v.toFixed(0) : v >= 10 ? v.toFixed(1) : v >= 0.1 ? v.toFixed(2) : v.toPrecision(2));

export function SparkCheck({ lines }: { lines: SolventLinePreset[] }) {
  const [fields, setFields] = useState<SparkFields>({ solvent: "Ethyl acetate", customMieMj: "", capacitancePf: "100", voltageKv: "5" });
  const set = (k: keyof SparkFields) => (v: string) => setFields((p) => ({ ...p, [k]: v }));
  const parsed = useMemo(() => sparkSchema.safeParse(fields), [fields]);
  const errors = parsed.success ? {} : fieldMessages(parsed.error.issues);
  const r = parsed.success ? checkSpark(parsed.data) : null;

  const linePresets = lines
    .filter((l) => l.solventMieMj !== null)
    .map((l) => ({
      key: String(l.id),
      label: `${l.name} (${l.solventName})`,
      onPick: () => {
        const known = COMMON_SOLVENTS.find((s) => s.name === l.solventName && s.mieMj === l.solventMieMj);
        setFields((p) => ({
          ...p,
          solvent: known ? known.name : CUSTOM_SOLVENT,
          customMieMj: known ? "" : String(l.solventMieMj),
          capacitancePf: l.conductorCapacitancePf !== null ? String(l.conductorCapacitancePf) : p.capacitancePf,
        }));
      },
    }));

  return (
    <CalcCard id="spark" title="Spark-hazard check for a solvent area" purpose="Could a spark from a charged, ungrounded conductor ignite the solvent vapour? A first screen, not a hazard assessment.">
      <Caution title="Screening aid only" testId="spark-caution">
        This check compares stored energy with a tabulated minimum ignition energy. It is not a hazard assessment and Stillfield is a monitoring aid, not a safety system. Hazardous (classified) areas are assessed by a qualified person under{" "}
        <b className="whitespace-nowrap">NFPA 77</b>, <b className="whitespace-nowrap">IEC TS 60079-32-1</b> and local codes. Bond and earth every conductor in a solvent area whatever this says, and isolate power and follow the plant&apos;s lockout procedure before touching neutralizer emitters.
      </Caution>
      <Caution title="Propagating brush discharges" testId="propagating-brush-caution">
        {PROPAGATING_BRUSH_CAUTION} That is where web lines are: film over idlers and earthed rollers, and metallized or foil laminates. Keep the web neutralized before it meets earthed metal where vapour is present.
      </Caution>
      <Presets label="Line:" items={linePresets} />
      <Presets label="Conductor:" items={TYPICAL_CAPACITANCES_PF.map((c) => ({ key: c.item, label: `${c.item.replace(/ \(.*\)/, "")} ~${c.maxPf} pF`, onPick: () => set("capacitancePf")(String(c.maxPf)) }))} />
      <FieldGrid>
        <SelectInput id="solvent" label="Solvent vapour" value={fields.solvent} onChange={set("solvent")} error={errors.solvent}>
          {COMMON_SOLVENTS.map((s) => (
            <option key={s.name} value={s.name}>
              {s.name} — {s.mieMj} mJ
            </option>
          ))}
          <option value={CUSTOM_SOLVENT}>Another solvent: enter its MIE</option>
        </SelectInput>
        {fields.solvent === CUSTOM_SOLVENT ? (
          <NumberInput id="customMieMj" label="Minimum ignition energy" unit="mJ" value={fields.customMieMj} onChange={set("customMieMj")} error={errors.customMieMj} hint="From the solvent's safety data" />
        ) : (
          <div className="hidden sm:block" />
        )}
        <NumberInput id="capacitancePf" label="Capacitance of the conductor" unit="pF" value={fields.capacitancePf} onChange={set("capacitancePf")} error={errors.capacitancePf} hint="A person is about 100–300 pF" />
        <NumberInput id="voltageKv" label="Its voltage" unit="kV" value={fields.voltageKv} onChange={set("voltageKv")} error={errors.voltageKv} hint="Measured, or the worst charge on the line" />
      </FieldGrid>

      {r ? (
        <>
          <Answer tone={r.verdict === "can ignite" ? "over" : r.verdict === "within tenfold of MIE" ? "near" : "normal"} testId="spark-answer">
            <span className="mb-1 block">
              <StateBadge state={VERDICT_STATE[r.verdict]} label={VERDICT_WORDS[r.verdict]} />
            </span>
            <span className="mb-1 block font-medium" data-testid="spark-ratio">
              Spark margin: {sparkMarginPhrase(r.ratioToMie, r.verdict)}
            </span>
            {r.words}
          </Answer>
          <Results
            rows={[
              { label: "Stored energy ½CV²", value: `${sig(r.energyMj)} mJ`, testId: "spark-energy" },
              { label: "Voltage that reaches the MIE", value: `${sig(r.voltageAtMieKv)} kV`, note: `screening margin: below 1/${SPARK_MARGIN_FACTOR} of the MIE` },
              { label: `Voltage that reaches MIE/${SPARK_MARGIN_FACTOR}`, value: `${sig(r.voltageAtMarginKv)} kV` },
            ]}
          />
          {r.brushCanIgnite ? (
            <p className="text-xs leading-relaxed text-ink-soft">
              A charged insulating web or film is not a conductor: its brush discharges release up to about {BRUSH_DISCHARGE_EQUIVALENT_ENERGY_MJ} mJ, more than this solvent&apos;s MIE, so a highly charged web can ignite the vapour whatever this figure says. Keep the web neutralized where vapour is present.
            </p>
          ) : null}
        </>
      ) : (
        <Answer tone="muted">Correct the marked fields to see the answer.</Answer>
      )}

      <div>
        <p className="mb-1 text-xs font-medium text-ink-soft">Minimum ignition energies of common solvent vapours in air</p>
        <table className="w-full text-sm" data-testid="mie-table">
          <thead className="text-left text-xs text-ink-faint">
            <tr>
              <th className="pb-1 font-medium">Solvent</th>
              <th className="pb-1 text-right font-medium">MIE</th>
              <th className="pb-1 pl-3 font-medium">Note</th>
            </tr>
          </thead>
          <tbody>
            {COMMON_SOLVENTS.map((s) => (
              <tr key={s.name} className="border-t border-paper-line">
                <td className="py-1">{s.name}</td>
                <td className="num py-1 text-right">{s.mieMj} mJ</td>
                <td className="py-1 pl-3 text-xs text-ink-faint">{s.note ?? ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-1.5 text-xs text-ink-faint">
          Source: the MIE tables of NFPA 77 (Annex) and IEC TS 60079-32-1, which draw on the same measurements; values at the most easily ignited concentration, ambient temperature and pressure. Quoted as commonly tabulated, not checked against the current editions; compilations differ by up to about 20 %. Use the value for your actual solvent mix from its safety data.
        </p>
      </div>

      <Method
        formula={
          <>
            W = ½ · C · V² &nbsp;(C in F, V in V → J)
            <br />ratio = W / MIE &nbsp;·&nbsp; V at MIE = √(2 · MIE / C)
            <br />≥ 1: can ignite &nbsp;·&nbsp; ≥ 1/{SPARK_MARGIN_FACTOR}: within tenfold &nbsp;·&nbsp; below: margin
          </>
        }
        source="Capacitive spark energy as compared with MIE in NFPA 77 and IEC TS 60079-32-1; the tenfold margin is common practice, not a rule of either standard."
        assumptions={[
          "The whole stored energy goes into one spark (the worst case for an isolated conductor).",
          "The vapour is at its most easily ignited concentration; richer or leaner mixtures need more energy, hot or oxygen-enriched ones less.",
          "Charged insulators (webs, films, plastic containers) are not covered by ½CV²: their brush discharges, and the far stronger propagating brush discharges of film on an earthed backing, are judged differently.",
        ]}
      />
    </CalcCard>
  );
}
