// The product's vocabulary, in one place: states, kinds and severities with their words,
// symbols and rank; durations; lengths of time. Units are in lib/units.ts, plant time and
// shifts in lib/plant-time.ts. Pure: the schema's enums, the worker, e-mails, reports and the
// UI all import from here.
export * from "./time";
export * from "./point-states";
export * from "./rule-kinds";
export * from "./alert-states";
export * from "./neutralizer-states";
export * from "./durations";
export * from "./alert-values";
