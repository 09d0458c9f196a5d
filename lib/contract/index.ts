// The MQTT device contract: topic names and the payload schema.
export * from "./topics";
export * from "./readings-payload";
