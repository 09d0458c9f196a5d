// npm run bench:rules — the rules engine's throughput with 500 rules on one core
// (scripts/rules-throughput.ts). The last line names the readings per second.
import { measureRulesThroughput } from "./rules-throughput";

const seconds = Number(process.argv[2] ?? 1200);
const r = measureRulesThroughput(seconds);
console.log(`${r.readings} readings, ${r.transitions} transitions, ${r.cpuS.toFixed(2)} s CPU`);
console.log(`rules: ${Math.round(r.readingsPerS)} readings/s with ${r.rules} rules`);
