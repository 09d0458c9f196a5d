// View types of a chart's history (db/queries/history.ts reads it; the line page draws it).

export const HISTORY_SOURCES = ["raw", "1m", "1h"] as const;
export type HistorySource = (typeof HISTORY_SOURCES)[number];

/** [bucket time (epoch ms), min, mean, max] */
export type HistoryPoint = [number, number, number, number];

export type HistoryResult = {
  deviceId: number;
  channel: string;
  fromTs: number;
  toTs: number;
  source: HistorySource;
  bucketMs: number;
  points: HistoryPoint[];
  /** newest reading time at or before toTs when the range holds no data (for "no readings since …") */
  lastTs: number | null;
};
