// Draws the chart an outbox mail asks for (its `chart` spec, lib/charts/alert-chart.ts) when the
// mailer sends it: the hour's readings from the database, the same SVG as the alert page
// (lib/charts/svg-chart.ts), turned into a PNG with sharp. A palette PNG of a 600 × 240 line
// chart is a few kB, far under the 60 kB an e-mail image should stay below; if it ever is not,
// it is sent smaller.
import sharp from "sharp";
import type { Db } from "../db/client";
import { loadChartPoints } from "../db/queries/alert-chart";
import { ALERT_CHART_CID, alertChartSpecSchema } from "../lib/charts/alert-chart";
import { renderSvgChart } from "../lib/charts/svg-chart";
import { formatPlantTime } from "../lib/plant-time";

export const MAX_CHART_BYTES = 60 * 1024;

export async function svgToPng(svg: string, width: number): Promise<Buffer> {
  return sharp(Buffer.from(svg), { density: 96 }).resize({ width }).png({ palette: true, colours: 32, compressionLevel: 9 }).toBuffer();
}

export async function renderMailChart(db: Db, chart: unknown, timeZone: string): Promise<{ filename: string; content: Buffer; cid: string; contentType: string } | null> {
  const parsed = alertChartSpecSchema.safeParse(chart);
  if (!parsed.success) return null;
  const spec = parsed.data;
  const points = await loadChartPoints(db, spec, 120);
  const svg = renderSvgChart({
    points,
    fromTs: spec.fromTs,
    toTs: spec.toTs,
    unit: spec.unit,
    timeZone,
    limits: spec.limits,
    mark: { ts: spec.markTs, label: `raised ${formatPlantTime(spec.markTs, timeZone, "HH:mm")}` },
    title: `${spec.title}, ${formatPlantTime(spec.fromTs, timeZone, "HH:mm")}–${formatPlantTime(spec.toTs, timeZone, "HH:mm")}`,
    width: 600,
    height: 240,
  });
  let png = await svgToPng(svg, 600);
  if (png.length > MAX_CHART_BYTES) png = await svgToPng(svg, 400);
  return { filename: `alert-${spec.alertId}-chart.png`, content: png, cid: ALERT_CHART_CID, contentType: "image/png" };
}
