"use client";
// The spark-energy margin of a solvent line at its worst current charge: ½CV² of the assumed
// largest isolated conductor against the solvent's minimum ignition energy (lib/physics).
// A screening figure only: solvent areas are assessed under NFPA 77 / IEC TS 60079-32-1.
import clsx from "clsx";
import { sparkMarginForLine } from "@/lib/physics/line-hazard";

function fmtMj(mj: number): string {
  if (mj === 0) return "0 mJ";
  if (mj < 0.01) return `${(mj * 1000).toFixed(1)} µJ`;
  return `${mj.toFixed(mj < 1 ? 2 : 1)} mJ`;
}

export function SparkMargin({
  solventName,
  solventMieMj,
  conductorCapacitancePf,
  worstChargeKv,
  className,
}: {
  solventName: string | null;
  solventMieMj: number | null;
  conductorCapacitancePf: number | null;
  worstChargeKv: number | null;
  className?: string;
}) {
  if (!solventName || solventMieMj == null || conductorCapacitancePf == null) return null;
  let m: ReturnType<typeof sparkMarginForLine> = null;
  try {
    m = sparkMarginForLine({ solventMieMj, conductorCapacitancePf, worstChargeKv });
  } catch {
    m = null;
  }
  if (!m) {
    return (
      <p className={clsx("text-xs text-ink-faint", className)} data-testid="spark-margin">
        Spark margin: no charge reading yet
      </p>
    );
  }
  const danger = m.verdict === "can ignite";
  const close = m.verdict === "within tenfold of MIE";
  return (
    <p
      className={clsx("text-xs", danger ? "font-semibold text-over" : close ? "text-near" : "text-ink-faint", className)}
      data-testid="spark-margin"
      title={`½CV² of a ${conductorCapacitancePf} pF isolated conductor at ${m.voltageKv.toFixed(1)} kV against the ${solventName} MIE of ${solventMieMj} mJ. Screening aid only; solvent areas are assessed by a qualified person under NFPA 77 / IEC TS 60079-32-1 and local codes.`}
    >
      {danger ? "◆ " : close ? "▲ " : ""}Spark margin: {fmtMj(m.energyMj)} at {m.voltageKv.toFixed(1)} kV vs {solventName} MIE {solventMieMj} mJ
      {Number.isFinite(m.marginFactor) ? ` (×${m.marginFactor >= 100 ? m.marginFactor.toFixed(0) : m.marginFactor.toFixed(1)} headroom)` : ""} · {conductorCapacitancePf} pF conductor assumed
    </p>
  );
}
