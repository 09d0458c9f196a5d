"use client";
// The spark-energy margin of a solvent line at its worst current charge: ½CV² of the assumed
// largest isolated conductor against the solvent's minimum ignition energy (lib/physics), in the
// same words on the Floor, the line page and the wallboard ("stored energy 64× the MIE: can
// ignite"). The screening caution and the propagating-brush caution are printed, not hidden in a
// tooltip, so touch screens and the wallboard show them too.
import clsx from "clsx";
import { PROPAGATING_BRUSH_CAUTION } from "@/lib/physics/electrostatics";
import { SPARK_SCREENING_CAUTION, sparkMarginForLine, sparkMarginPhrase } from "@/lib/physics/line-hazard";

function fmtMj(mj: number): string {
  if (mj === 0) return "0 mJ";
  if (mj < 0.01) return `${(mj * 1000).toFixed(1)} µJ`;
  return `${mj.toFixed(mj < 1 ? 2 : 1)} mJ`;
}

type Variant = "card" | "page" | "wall";

export function SparkMargin({
  solventName,
  solventMieMj,
  conductorCapacitancePf,
  worstChargeKv,
  className,
  variant = "card",
}: {
  solventName: string | null;
  solventMieMj: number | null;
  conductorCapacitancePf: number | null;
  worstChargeKv: number | null;
  className?: string;
  /** card: Floor card (short cautions) · page: line page (full cautions) · wall: wallboard (dark, large) */
  variant?: Variant;
}) {
  if (!solventName || solventMieMj == null || conductorCapacitancePf == null) return null;
  let m: ReturnType<typeof sparkMarginForLine> = null;
  try {
    m = sparkMarginForLine({ solventMieMj, conductorCapacitancePf, worstChargeKv });
  } catch {
    m = null;
  }
  const wall = variant === "wall";
  const cautions = (
    <>
      <span className={clsx("block", wall ? "text-night-soft" : "text-ink-faint")} data-testid="spark-caution-visible">
        {variant === "page" ? SPARK_SCREENING_CAUTION : "Screening figure only: solvent areas are assessed by a qualified person under NFPA 77, IEC TS 60079-32-1 and local codes."}
      </span>
      <span className={clsx("block", wall ? "text-night-soft" : "text-ink-faint")} data-testid="propagating-brush-caution">
        {variant === "page" ? PROPAGATING_BRUSH_CAUTION : "Film over earthed rollers can give propagating brush discharges (up to about 1 J) that this figure does not cover (IEC TS 60079-32-1)."}
      </span>
    </>
  );
  if (!m) {
    return (
      <div className={clsx(wall ? "text-[clamp(0.8rem,0.95vw,1.1rem)]" : "text-xs", className)} data-testid="spark-margin-block">
        <p className={wall ? "text-night-soft" : "text-ink-faint"} data-testid="spark-margin">
          Spark margin ({solventName}): no charge reading yet
        </p>
        {cautions}
      </div>
    );
  }
  const danger = m.verdict === "can ignite";
  const close = m.verdict === "within tenfold of MIE";
  const tone = danger
    ? wall
      ? "font-semibold text-over-bright"
      : "font-semibold text-over"
    : close
      ? wall
        ? "text-near-bright"
        : "text-near"
      : wall
        ? "text-night-soft"
        : "text-ink-soft";
  return (
    <div className={clsx(wall ? "text-[clamp(0.8rem,0.95vw,1.1rem)] leading-snug" : "text-xs leading-snug", className)} data-testid="spark-margin-block">
      <p className={tone} data-testid="spark-margin">
        {danger ? "◆ " : close ? "▲ " : ""}
        Spark margin: {sparkMarginPhrase(m.ratioToMie, m.verdict)}
        <span className={clsx("font-normal", wall ? "text-night-soft" : "text-ink-faint")}>
          {" "}
          ({fmtMj(m.energyMj)} at {m.voltageKv.toFixed(1)} kV, {conductorCapacitancePf} pF conductor assumed; {solventName} MIE {solventMieMj} mJ)
        </span>
      </p>
      {cautions}
    </div>
  );
}
