// Equipment records, one import for the pages and actions. The read models live in files by job:
// equipment-labels (words), places, neutralizers, equipment-history (events and uploads),
// neutralizer-effect (charge before vs after), devices, neutralizer-detail (one unit's page).
// Explicit column selections throughout: a device's secret hash never leaves devices.ts' writes.
export * from "./equipment-labels";
export * from "./places";
export * from "./neutralizers";
export * from "./equipment-history";
export * from "./neutralizer-effect";
export * from "./devices";
export * from "./neutralizer-detail";
export { getPlantSettings } from "./plant-settings";
