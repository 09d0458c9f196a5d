// The reading sinks the ingest worker builds at start-up, in order (the contract is in
// ingest/sinks.ts). To add one, write a SinkFactory and list it here; nothing registers itself
// as a side effect of being imported.
import { createAlertsRunner } from "./alerts-runner";
import type { SinkFactory } from "./sinks";

export const sinkFactories: readonly SinkFactory[] = [
  // the live rules engine (it returns at once; it loads rules and topology in the background)
  createAlertsRunner,
];
