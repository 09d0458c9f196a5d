// Durations in words, the one formatter for alerts, e-mails, reports and rule messages.
import { DAY_MS, HOUR_MS } from "./time";

/**
 * "45 s", "2 min 30 s", "12 min", "2 h 5 min", "3 h", "2 d 4 h".
 * Seconds stay exact up to 10 min (a 150 s silence is "2 min 30 s", not "3 min"), then whole
 * minutes up to 2 h, hours and minutes up to 2 days, then days and hours.
 */
export function formatDuration(ms: number): string {
  const totalS = Math.max(0, Math.round(ms / 1000));
  if (totalS < 120) return `${totalS} s`;
  if (totalS < 600) {
    const s = totalS % 60;
    return s === 0 ? `${Math.floor(totalS / 60)} min` : `${Math.floor(totalS / 60)} min ${s} s`;
  }
  const totalMin = Math.round(totalS / 60);
  if (totalMin < 120) return `${totalMin} min`;
  if (totalMin * 60_000 < 2 * DAY_MS) {
    const h = Math.floor(totalMin / 60);
    const min = totalMin % 60;
    return min === 0 ? `${h} h` : `${h} h ${min} min`;
  }
  const totalH = Math.round((totalMin * 60_000) / HOUR_MS);
  const d = Math.floor(totalH / 24);
  const h = totalH % 24;
  return h === 0 ? `${d} d` : `${d} d ${h} h`;
}
