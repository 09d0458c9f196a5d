// The reading sinks the ingest worker builds at start-up, in order (the contract is in
// ingest/sinks.ts). To add one, write a SinkFactory and list it here; nothing registers itself
// as a side effect of being imported.
import { getSettings } from "../lib/settings";
import { createAlertOwner } from "./alerts-owner";
import { createAlertsRunner } from "./alerts-runner";
import type { SinkFactory } from "./sinks";

export const sinkFactories: readonly SinkFactory[] = [
  // the live rules engine (it returns at once; it loads rules and topology in the background);
  // with several workers, the one holding the alert-owner lease runs it (ingest/alerts-owner.ts)
  (ctx) => (getSettings().ALERTS_OWNER === "lease" && getSettings().ALERTS_RUNNER === "on" ? createAlertOwner(ctx) : createAlertsRunner(ctx)),
];
