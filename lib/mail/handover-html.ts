// The HTML part of the handover e-mail (pure): one small chart per line (inline images by content
// id, each with alt text), then the same words as the plain-text part, kept as preformatted text.
import { escapeXml } from "../charts/svg-chart";

export type HandoverChartRef = { cid: string; alt: string; lineName: string };

export function handoverHtml(text: string, charts: readonly HandoverChartRef[]): string {
  const out: string[] = [];
  out.push(`<!doctype html><html><body style="font-family:Arial,Helvetica,sans-serif;color:#1f2933">`);
  if (charts.length > 0) {
    out.push(`<h2 style="font-size:16px;margin:0 0 8px">Charge by line over the shift</h2>`);
    for (const c of charts) {
      out.push(`<div style="margin:0 0 10px"><div style="font-size:13px;font-weight:bold">${escapeXml(c.lineName)}</div>`);
      out.push(`<img src="cid:${escapeXml(c.cid)}" alt="${escapeXml(c.alt)}" width="480" height="140" style="display:block;border:1px solid #d5dbe1"></div>`);
    }
  }
  out.push(`<pre style="font-family:Consolas,Menlo,monospace;font-size:13px;white-space:pre-wrap">${escapeXml(text)}</pre>`);
  out.push(`</body></html>`);
  return out.join("\n");
}
