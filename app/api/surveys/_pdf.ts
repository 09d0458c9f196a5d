// The survey report as a PDF (pdfkit): header with the meter and its calibration, the cautions,
// a sketch of the line in web-path order with the readings and the neutralizers, the readings
// table with reductions and fixed-meter values, findings, actions, cross-checks and photos.
// pdfkit's built-in Helvetica covers WinAnsi only, so a few symbols are spelled out.
import "server-only";
import PDFDocument from "pdfkit";
import { TZDate } from "@date-fns/tz";
import { FINDING_LABELS } from "@/lib/surveys/findings";
import { ACTION_KIND_LABELS } from "@/lib/surveys/schemas";
import { SURVEY_CAUTIONS } from "@/lib/surveys/cautions";
import { EQUIVALENCE_FORMULA } from "@/lib/surveys/judge";
import type { SurveyReport } from "@/lib/surveys/types";

const INK = "#1f2328";
const SOFT = "#5a6270";
const LINE = "#c9ced6";

/** Characters outside WinAnsi become plain equivalents. */
export function pdfText(s: string): string {
  return s.replace(/\u2212/g, "-").replace(/\u2192/g, "->").replace(/[\u2264]/g, "<=").replace(/[\u2265]/g, ">=").replace(/[\u25c6\u25b2\u25cb]/g, "").replace(/[^\x20-\x7e\u00a0-\u00ff\u2013\u2014\u2018\u2019\u201c\u201d\u2022\u2026\u20ac]/g, "?");
}

const kv = (v: number | null | undefined) => (v === null || v === undefined ? "-" : `${v > 0 ? "+" : v < 0 ? "-" : ""}${Math.abs(v).toFixed(1)} kV`);

function when(ts: number | null, tz: string): string {
  if (ts === null) return "-";
  const d = new TZDate(ts, tz);
  const p = (n: number) => String(n).padStart(2, "0");
  return `${d.getFullYear()}-${p(d.getMonth() + 1)}-${p(d.getDate())} ${p(d.getHours())}:${p(d.getMinutes())}`;
}

export async function buildSurveyPdf(rep: SurveyReport, opts: { timeZone: string; plantName: string; photo: (id: number) => Promise<Buffer | null> }): Promise<Buffer> {
  const doc = new PDFDocument({ size: "A4", margin: 40, info: { Title: pdfText(`Survey ${rep.id} - ${rep.lineName}`), Author: "Stillfield" } });
  const chunks: Buffer[] = [];
  doc.on("data", (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on("end", () => resolve(Buffer.concat(chunks)));
    doc.on("error", reject);
  });
  const W = doc.page.width - 80;
  const t = (s: string) => pdfText(s);

  doc.fillColor(SOFT).fontSize(9).text(t(`${opts.plantName} · Stillfield walk-down survey`), { continued: false });
  doc.fillColor(INK).fontSize(18).font("Helvetica-Bold").text(t(`${rep.lineName} — survey #${rep.id}`));
  doc.font("Helvetica").fontSize(9.5).fillColor(SOFT);
  doc.text(t(`${rep.areaName} · plan “${rep.planName}” version ${rep.planVersion}${rep.planVersion !== rep.currentPlanVersion ? ` (plan is now at version ${rep.currentPlanVersion})` : ""}`));
  doc.text(t(`Started ${when(rep.startedTs, opts.timeZone)} · finished ${when(rep.finishedTs, opts.timeZone)} · by ${rep.personName ?? "-"}`));
  doc.text(t(`Meter: ${rep.meterLabel} · calibrated ${rep.meterCalibratedOn ?? "date not given"} · reads at ${rep.calibratedDistanceMm} mm`));
  if (rep.solventName) doc.text(t(`Solvent area: ${rep.solventName}.`));
  if (rep.note) doc.text(t(`Note: ${rep.note}`));
  doc.moveDown(0.6);

  // cautions
  const cy = doc.y;
  doc.fontSize(8.5).fillColor(INK);
  const cautionText = t(SURVEY_CAUTIONS.join("  "));
  const ch = doc.heightOfString(cautionText, { width: W - 16 }) + 22;
  doc.rect(40, cy, W, ch).lineWidth(1).strokeColor("#8a6d1a").stroke();
  doc.font("Helvetica-Bold").text("CAUTION", 48, cy + 6);
  doc.font("Helvetica").text(cautionText, 48, doc.y + 1, { width: W - 16 });
  doc.y = cy + ch + 12;

  // line sketch in web-path order
  doc.x = 40;
  doc.font("Helvetica-Bold").fontSize(11).fillColor(INK).text("Line in web-path order", 40, doc.y);
  const sy = doc.y + 30;
  const n = Math.max(rep.spots.length, 1);
  const step = W / n;
  doc.moveTo(40, sy).lineTo(40 + W, sy).lineWidth(2).strokeColor(LINE).stroke();
  doc.fontSize(7.5).font("Helvetica");
  rep.spots.forEach((s, i) => {
    const x = 40 + step * i + step / 2;
    const over = s.reading && s.limitKv !== null && Math.abs(s.reading.equivalentKv) > s.limitKv;
    if (s.afterNeutralizer) {
      const nx = x - step / 2;
      doc.rect(nx - 3, sy - 12, 6, 24).fillColor("#4b5563").fill();
      doc.fillColor(SOFT).text(t(s.afterNeutralizer), nx - step / 2 + 2, sy + 30, { width: step - 4, align: "center" });
    }
    if (over) doc.save().translate(x, sy).rotate(45).rect(-5, -5, 10, 10).fillColor("#b42318").fill().restore();
    else doc.circle(x, sy, 4.5).lineWidth(1.5).fillColor("#ffffff").strokeColor(INK).fillAndStroke();
    doc.fillColor(INK).font("Helvetica-Bold").text(t(s.name), x - step / 2 + 2, sy - 24, { width: step - 4, align: "center", height: 10, ellipsis: true });
    doc.font("Helvetica").fillColor(over ? "#b42318" : INK).text(t(`${kv(s.reading?.equivalentKv)}${over ? " OVER" : ""}`), x - step / 2 + 2, sy + 9, { width: step - 4, align: "center" });
    if (s.reductionPct !== null) doc.fillColor(SOFT).text(t(`${Math.round(s.reductionPct)} % less`), x - step / 2 + 2, sy + 18, { width: step - 4, align: "center" });
  });
  doc.y = sy + 52;

  // readings table
  doc.x = 40;
  doc.font("Helvetica-Bold").fontSize(11).fillColor(INK).text("Readings", 40, doc.y);
  doc.font("Helvetica").fontSize(8).fillColor(SOFT).text(t(`Equivalent at ${rep.calibratedDistanceMm} mm: ${EQUIVALENCE_FORMULA} (large flat sheet; valid for wide webs near earthed metal).`));
  const cols = [18, 96, 70, 44, 62, 40, 50, 56, 79];
  const heads = ["#", "Spot", "As read", "At mm", "kV at cal.", "Limit", "Reduction", "Fixed meter", "Line"];
  let y = doc.y + 4;
  const row = (cells: string[], bold = false) => {
    doc.font(bold ? "Helvetica-Bold" : "Helvetica").fontSize(8).fillColor(INK);
    let x = 40;
    const h = Math.max(...cells.map((c, i) => doc.heightOfString(t(c), { width: cols[i] - 4 }))) + 4;
    if (y + h > doc.page.height - 50) {
      doc.addPage();
      y = 40;
    }
    cells.forEach((c, i) => {
      doc.text(t(c), x + 2, y + 2, { width: cols[i] - 4 });
      x += cols[i];
    });
    y += h;
    doc.moveTo(40, y).lineTo(40 + W, y).lineWidth(0.5).strokeColor(LINE).stroke();
  };
  row(heads, true);
  for (const s of rep.spots) {
    const r = s.reading;
    row([
      String(s.position),
      `${s.name}${s.afterNeutralizer ? ` (after ${s.afterNeutralizer})` : ""}${r?.note ? ` — ${r.note}` : ""}`,
      r ? `${r.enteredValue > 0 ? "+" : ""}${r.enteredValue} ${r.unit}` : "not measured",
      r ? String(r.distanceMm) : "-",
      kv(r?.equivalentKv),
      s.limitKv !== null ? `${s.limitKv} kV` : "-",
      s.reductionPct !== null ? `${Math.round(s.reductionPct)} %` : "-",
      r?.fixedKv !== null && r?.fixedKv !== undefined ? kv(r.fixedKv) : "-",
      r ? (r.running ? `running${r.speedMpm !== null ? ` ${r.speedMpm} m/min` : ""}` : "stopped") : "-",
    ]);
  }
  doc.y = y + 12;

  const section = (title: string, lines: string[], empty: string) => {
    if (doc.y > doc.page.height - 100) doc.addPage();
    doc.x = 40;
    doc.font("Helvetica-Bold").fontSize(11).fillColor(INK).text(title, 40, doc.y);
    doc.font("Helvetica").fontSize(9).fillColor(INK);
    if (!lines.length) doc.fillColor(SOFT).text(empty);
    for (const l of lines) doc.text(t(`• ${l}`), { width: W });
    doc.moveDown(0.6);
  };
  section("Findings", rep.findings.map((f) => `${FINDING_LABELS[f.kind]}: ${f.text}`), "No findings: every point within its limit, bars reducing well, no charge building up.");
  section(
    "Actions",
    rep.actions.map((a) => `${ACTION_KIND_LABELS[a.kind]} — ${a.text} · owner ${a.ownerName} · due ${a.dueDate} · ${a.state === "open" ? "OPEN" : `closed ${when(a.closedTs, opts.timeZone)}${a.closeNote ? `: ${a.closeNote}` : ""}`}`),
    "No actions.",
  );
  if (rep.crossChecks.length) {
    section(
      "Fixed-meter cross-checks",
      rep.crossChecks.map((c) => `${c.deviceCode}: fixed ${kv(c.fixedKv)} against handheld ${kv(c.handheldKv)}, ${Math.round(c.diffShare * 100)} % apart (allowed ${Math.round(c.allowedShare * 100)} %)${c.flagged ? " — CHECK CALIBRATION" : " — agrees"}`),
      "",
    );
  }

  const withPhotos = rep.spots.filter((s) => s.reading?.photoId);
  if (withPhotos.length) {
    if (doc.y > doc.page.height - 220) doc.addPage();
    doc.x = 40;
    doc.font("Helvetica-Bold").fontSize(11).fillColor(INK).text("Photos", 40, doc.y);
    let px = 40;
    let py = doc.y + 4;
    for (const s of withPhotos) {
      const bytes = await opts.photo(s.reading!.photoId!);
      if (!bytes) continue;
      if (px + 160 > 40 + W) {
        px = 40;
        py += 150;
      }
      if (py + 150 > doc.page.height - 40) {
        doc.addPage();
        py = 40;
        px = 40;
      }
      doc.image(bytes, px, py, { fit: [160, 120] });
      doc.font("Helvetica").fontSize(8).fillColor(SOFT).text(t(s.name), px, py + 124, { width: 160 });
      px += 170;
    }
  }
  doc.end();
  return done;
}
