export * from "./people";
export * from "./plant";
export * from "./readings";
export * from "./alerts";
export * from "./records";
export * from "./surveys";
export * from "./gateways";
export * from "./relations";
