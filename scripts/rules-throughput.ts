// How many readings per second the rules engine takes with 500 rules, on one core: the
// invented 5-hall plant of tests/unit/rules/bench-plant.ts (200 meters, 150 neutralizers,
// exactly 500 rules), 1 Hz data, warmed up first, CPU time of this process only.
import { createRuleEngine } from "../lib/rules/engine";
import { createBenchPlant, createBenchReadings } from "../tests/unit/rules/bench-plant";

export type Throughput = { rules: number; readings: number; cpuS: number; readingsPerS: number; transitions: number };

export function measureRulesThroughput(seconds = 1200): Throughput {
  const { topology, rules } = createBenchPlant();
  const readings = createBenchReadings(topology, seconds);
  // warm-up on a separate engine so the JIT has seen every evaluator
  const warm = createRuleEngine({ rules, topology });
  for (let i = 0; i < Math.min(readings.length, 60_000); i++) warm.push(readings[i]);
  const engine = createRuleEngine({ rules, topology });
  let transitions = 0;
  let nextTick = readings[0].ts + 10_000;
  const before = process.cpuUsage();
  for (const r of readings) {
    if (r.ts >= nextTick) {
      transitions += engine.tick(nextTick).length;
      nextTick += 10_000;
    }
    transitions += engine.push(r).length;
  }
  const used = process.cpuUsage(before);
  const cpuS = (used.user + used.system) / 1e6;
  return { rules: rules.length, readings: readings.length, cpuS, readingsPerS: readings.length / cpuS, transitions };
}
