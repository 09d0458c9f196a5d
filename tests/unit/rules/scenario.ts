/**
 * One hour of the demo plant at 1 Hz (field meters, line gateways) and every 30 s (hall
 * loggers), hand-scripted so that every rule kind fires at least once under the default rules:
 * - Unwind on the gravure press jumps to about −16 kV at 600 s (charge_high);
 * - the gravure press stops from 1500 s to 2100 s;
 * - the gravure Rewind meter is silent from 1000 s to 1400 s (sensor_silent);
 * - the slitter's Unwind meter sticks at 2.34 kV from 2000 s (sensor_flat);
 * - the slitter's Rewind charge climbs 3 -> 15 kV from 3000 s to 3200 s (charge_rate, charge_high);
 * - Bar U1 fouls from 2400 s: Print deck 1 keeps more and more of the Unwind charge (effect_loss);
 * - Press Hall RH falls 0.2 %/min from 38 % (rh_forecast well before rh_low).
 * Noise comes from a seeded generator, so the series is the same on every run.
 */
import type { Reading } from "../../../lib/rules/types";
import { S, T0 } from "./fixtures";

/** mulberry32: a small seeded pseudo-random generator (public domain). */
function createRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export const SCENARIO_SECONDS = 3600;

export function buildScenario(seconds = SCENARIO_SECONDS, startTs = T0): Reading[] {
  const random = createRandom(20250115);
  const noise = (amplitude: number) => (random() * 2 - 1) * amplitude;
  const out: Reading[] = [];
  for (let s = 0; s < seconds; s++) {
    const ts = startTs + s * S;
    const gravureRunning = s < 1500 || s >= 2100;
    const run = gravureRunning ? 1 : 0;
    out.push({ sensorKey: "gw-gravure", channel: "running", ts, value: run });
    out.push({ sensorKey: "gw-slitter", channel: "running", ts, value: 1 });

    const unwindKv = gravureRunning ? (s >= 600 && s < 700 ? -16 : -9) + noise(0.3) : -0.3 + noise(0.1);
    out.push({ sensorKey: "fm-gp-unwind", channel: "charge_kv", ts, value: unwindKv });

    const fouling = s < 2400 ? 0.15 : Math.min(0.9, 0.15 + (0.75 * (s - 2400)) / 1200);
    const deckKv = gravureRunning ? unwindKv * fouling + noise(0.2) : -0.1 + noise(0.1);
    out.push({ sensorKey: "fm-gp-deck1", channel: "charge_kv", ts, value: deckKv });

    if (s < 1000 || s >= 1400) {
      out.push({ sensorKey: "fm-gp-rewind", channel: "charge_kv", ts, value: gravureRunning ? -2 + noise(0.3) : noise(0.1) });
    }

    out.push({ sensorKey: "fm-sr-unwind", channel: "charge_kv", ts, value: s < 2000 ? 4 + noise(0.4) : 2.34 });

    const rewindKv = s < 3000 ? 3 + noise(0.5) : s < 3200 ? 3 + (12 * (s - 3000)) / 200 + noise(0.2) : 15 + noise(0.3);
    out.push({ sensorKey: "fm-sr-rewind", channel: "charge_kv", ts, value: rewindKv });

    if (s % 30 === 0) {
      out.push({ sensorKey: "th-press", channel: "rh_pct", ts, value: 38 - (0.2 * s) / 60 + noise(0.1) });
      out.push({ sensorKey: "th-press", channel: "temp_c", ts, value: 21 + noise(0.2) });
      out.push({ sensorKey: "th-conv", channel: "rh_pct", ts, value: 40 + noise(0.3) });
      out.push({ sensorKey: "th-conv", channel: "temp_c", ts, value: 20 + noise(0.2) });
    }
  }
  return out;
}
