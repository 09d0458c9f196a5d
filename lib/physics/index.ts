/**
 * Stillfield physics: psychrometrics (ASHRAE Fundamentals 2017 ch. 1), electrostatics for static
 * control, and neutralizer performance. Pure functions shared by the app, the worker and the
 * simulators.
 */
export * from "./psychrometrics";
export * from "./electrostatics";
export * from "./neutralizer";
export * from "./line-hazard";
export * from "./neutralizer-kinds";
