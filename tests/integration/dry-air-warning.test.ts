// Tomorrow's dry-air warning end to end: the plant's location (seeded demo site) → the weather SDK
// against the local fake (its scripted cold snap arrives tomorrow, ingest/weather-fake.ts) → the
// forecast kept in MariaDB → the warning the Floor shows and the daily digest e-mail carries.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq, like } from "drizzle-orm";
import { createTestDatabase, type TestDatabase } from "../helpers/test-db";
import { outbox, people, settings } from "@/db/schema";
import { getStoredForecast, loadDryAirWarnings } from "@/db/queries/forecast";
import { refreshStoredForecast } from "@/ingest/forecast-store";
import { queueDailyDigests } from "@/ingest/mailer";
import { startWeatherFake } from "@/ingest/weather-fake";
import { DEMO_PLANT_LOCATION } from "@/lib/demo-plant";

let tdb: TestDatabase;
let fake: Awaited<ReturnType<typeof startWeatherFake>>;
// Wednesday 14 Jan 2026, 07:00 UTC (07:00 in Europe/London, the demo plant's zone): after the
// 06:00 digest hour, so the digest for Tuesday goes out now and warns about Thursday
const now = Date.UTC(2026, 0, 14, 7, 0);

beforeAll(async () => {
  tdb = await createTestDatabase("dry_air_warning", { seed: true });
  fake = await startWeatherFake(0, () => now);
});
afterAll(async () => {
  await fake?.close();
  await tdb?.close();
});

describe("tomorrow's dry air from the stored forecast", () => {
  it("fetches the forecast for the plant's location and keeps it in the settings row", async () => {
    expect(await getStoredForecast(tdb.db)).toBeNull();
    expect(await loadDryAirWarnings(tdb.db, now)).toBeNull();
    expect(await refreshStoredForecast(tdb.db, `http://127.0.0.1:${fake.port}/v1/forecast`, now)).toBe(true);
    const f = await getStoredForecast(tdb.db);
    expect(f?.fetchedTs).toBe(now);
    expect(f?.source).toBe(`127.0.0.1:${fake.port}`);
    expect(f?.latitude).toBeCloseTo(DEMO_PLANT_LOCATION.latitude, 3);
    expect(f?.hours).toHaveLength(48);
  });

  it("warns about the Press Hall on Thursday morning, from the fake's cold snap, with the source and time", async () => {
    const w = await loadDryAirWarnings(tdb.db, now);
    expect(w?.date).toBe("2026-01-15");
    const press = w!.lines.filter((l) => l.includes("Press Hall"));
    expect(press.length).toBeGreaterThanOrEqual(1);
    expect(press[0]).toMatch(/^Thu \d\d:00–\d\d:00: Press Hall expected \d+–\d+ % RH without humidification, below the 40 % limit; about \d+ kg\/h of water needed/);
    expect(w!.sourceLine).toBe(`Forecast from 127.0.0.1:${fake.port}, fetched Wed 07:00 (plant time)`);
    // a day later the forecast no longer covers "tomorrow" (it holds two days from the fetch): no warning rather than a stale one
    expect(await loadDryAirWarnings(tdb.db, now + 86_400_000)).toBeNull();
  });

  it("puts the warning in the daily digest e-mail, text and HTML", async () => {
    const wants = await tdb.db.select({ id: people.id }).from(people).where(eq(people.wantsDailyDigest, true));
    expect(wants.length).toBeGreaterThan(0);
    expect(await queueDailyDigests(tdb.db, now, "http://127.0.0.1:3000")).toBe(wants.length);
    const [row] = await tdb.db.select().from(outbox).where(like(outbox.dedupeKey, "digest:2026-01-13:%")).limit(1);
    expect(row.bodyText).toMatch(/Tomorrow's dry air:\n- Thu \d\d:00–\d\d:00: Press Hall expected/);
    expect(row.bodyText).toContain(`Forecast from 127.0.0.1:${fake.port}, fetched Wed 07:00 (plant time)`);
    expect(row.bodyHtml).toMatch(/<li>Thu \d\d:00–\d\d:00: Press Hall expected \d+–\d+ % RH without humidification/);
  });

  it("fetches nothing while the plant has no location", async () => {
    await tdb.db.update(settings).set({ value: { name: "Harrow Fen Packaging" } }).where(eq(settings.key, "plant"));
    expect(await refreshStoredForecast(tdb.db, `http://127.0.0.1:${fake.port}/v1/forecast`, now)).toBe(false);
  });
});
