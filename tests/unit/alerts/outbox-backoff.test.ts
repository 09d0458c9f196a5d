// Mail retry backoff (db/queries/outbox.ts retryBackoffMs): doubling from the base, capped,
// with at most 20 % jitter. Expected values worked by hand (base × 2^(attempt−1)).
import { describe, expect, it } from "vitest";
import { retryBackoffMs } from "../../../db/queries/outbox";
import { outboxMessageId } from "../../../ingest/mailer";
import { previousPlantDay } from "../../../lib/plant-time";

describe("retryBackoffMs", () => {
  it("doubles from the base: 5 s, 10 s, 20 s, 40 s", () => {
    expect([1, 2, 3, 4].map((n) => retryBackoffMs(n, 5_000, 300_000, 0))).toEqual([5_000, 10_000, 20_000, 40_000]);
  });
  it("is capped at the maximum (5 s × 2^9 = 2560 s > 300 s)", () => {
    expect(retryBackoffMs(10, 5_000, 300_000, 0)).toBe(300_000);
    expect(retryBackoffMs(1000, 5_000, 300_000, 0)).toBe(300_000);
  });
  it("adds at most 20 % jitter", () => {
    expect(retryBackoffMs(2, 5_000, 300_000, 1)).toBe(12_000);
    expect(retryBackoffMs(2, 5_000, 300_000, 0.5)).toBe(11_000);
  });
  it("treats attempt 0 like the first attempt", () => {
    expect(retryBackoffMs(0, 5_000, 300_000, 0)).toBe(5_000);
  });
});

describe("outboxMessageId", () => {
  it("is the same on every attempt and names the outbox row and database", () => {
    expect(outboxMessageId(42, "stillfield", "Stillfield <alerts@stillfield.invalid>")).toBe("<outbox-42.stillfield@stillfield.invalid>");
    expect(outboxMessageId(42, "stillfield", "Stillfield <alerts@stillfield.invalid>")).toBe(outboxMessageId(42, "stillfield", "Stillfield <alerts@stillfield.invalid>"));
    expect(outboxMessageId(43, "stillfield", "x")).toBe("<outbox-43.stillfield@stillfield.invalid>");
  });
});

describe("previousPlantDay", () => {
  it("gives yesterday's plant-local day (London in winter is UTC+0)", () => {
    const now = Date.UTC(2026, 0, 13, 7, 30);
    const d = previousPlantDay(now, "Europe/London");
    expect(d.date).toBe("2026-01-12");
    expect(d.fromTs).toBe(Date.UTC(2026, 0, 12, 0, 0));
    expect(d.toTs).toBe(Date.UTC(2026, 0, 13, 0, 0));
    expect(d.hourNow).toBe(7);
    expect(d.weekday).toBe(2); // 13 Jan 2026 is a Tuesday
  });
  it("follows summer time (London UTC+1 in July): the day starts at 23:00 UTC", () => {
    const now = Date.UTC(2026, 6, 15, 6, 0); // 07:00 plant time
    const d = previousPlantDay(now, "Europe/London");
    expect(d.date).toBe("2026-07-14");
    expect(d.fromTs).toBe(Date.UTC(2026, 6, 13, 23, 0));
    expect(d.toTs).toBe(Date.UTC(2026, 6, 14, 23, 0));
    expect(d.hourNow).toBe(7);
  });
});
