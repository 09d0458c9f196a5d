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
import { isLineChartSpec, lineChartCid, mailChartSpecs, mergeSeries, type LineMailChartSpec } from "../lib/charts/line-mail-chart";
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

/** Under this a line's small chart in the handover e-mail stays (it is sent smaller if not). */
export const MAX_LINE_CHART_BYTES = 25 * 1024;

type MailImage = { filename: string; content: Buffer; cid: string; contentType: string };

async function renderLineChart(db: Db, spec: LineMailChartSpec, timeZone: string): Promise<MailImage> {
  const series = await Promise.all(spec.deviceIds.map((deviceId) => loadChartPoints(db, { deviceId, channel: "charge_kv", fromTs: spec.fromTs, toTs: spec.toTs }, 96)));
  const limits = spec.limitKv === null ? [] : [{ value: spec.limitKv, label: `+${spec.limitKv} kV` }, { value: -spec.limitKv, label: `\u2212${spec.limitKv} kV` }];
  const svg = renderSvgChart({ points: mergeSeries(series), fromTs: spec.fromTs, toTs: spec.toTs, unit: "kV", timeZone, limits, width: 480, height: 140, compact: true });
  let png = await svgToPng(svg, 480);
  if (png.length > MAX_LINE_CHART_BYTES) png = await svgToPng(svg, 360);
  return { filename: `line-${spec.lineId}-chart.png`, content: png, cid: lineChartCid(spec.lineId), contentType: "image/png" };
}

/** Every chart an outbox `chart` value asks for (one spec or a list), each its own inline PNG; one that cannot be drawn is left out. */
export async function renderMailCharts(db: Db, chart: unknown, timeZone: string, onError: (err: unknown) => void = () => {}): Promise<MailImage[]> {
  const images: MailImage[] = [];
  for (const spec of mailChartSpecs(chart)) {
    try {
      const img = isLineChartSpec(spec) ? await renderLineChart(db, spec, timeZone) : await renderMailChart(db, spec, timeZone);
      if (img) images.push(img);
    } catch (err) {
      onError(err);
    }
  }
  return images;
}
