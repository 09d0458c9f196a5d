// Topic names and the broker's access rules (lib/contract/README.md: a device publishes only under its
// own prefix and subscribes to nothing but its command topic; internal topics are the service
// account's).
import { describe, expect, it } from "vitest";
import { deviceTopicReader, deviceTopics, internalTopics, parseDeviceTopic } from "@/lib/contract/topics";
import { mayPublish, maySubscribe } from "@/ingest/broker-acl";

const dev = { kind: "device" as const, code: "fm-gravure-1-unwind" };
const worker = { kind: "service" as const, role: "worker" as const };
const app = { kind: "service" as const, role: "app" as const };

describe("device topics", () => {
  it("round-trips a device topic", () => {
    expect(parseDeviceTopic(deviceTopics.readings("th-press-hall"))).toEqual({ code: "th-press-hall", kind: "readings" });
    expect(parseDeviceTopic(deviceTopics.status("sg-flexo-2"))).toEqual({ code: "sg-flexo-2", kind: "status" });
  });
  it("refuses anything else", () => {
    for (const t of ["stillfield/d//readings", "stillfield/d/a/b/readings", "stillfield/d/+/readings", "other/d/x/readings", "stillfield/d/x/values"]) {
      expect(parseDeviceTopic(t)).toBeNull();
    }
  });
});

describe("the remembering topic reader", () => {
  it("answers as parseDeviceTopic does, refusals included, and starts again when full", () => {
    const read = deviceTopicReader(3);
    const names = [deviceTopics.readings("a-1"), "stillfield/d//readings", deviceTopics.status("b-2"), deviceTopics.readings("c-3"), deviceTopics.readings("a-1"), "other/x"];
    for (const round of [1, 2]) for (const t of names) expect(read(t), `${t} (round ${round})`).toEqual(parseDeviceTopic(t));
    expect(read(deviceTopics.readings("a-1"))).toEqual({ code: "a-1", kind: "readings" });
  });
});

describe("broker access rules", () => {
  it("lets a device publish its own readings and status only", () => {
    expect(mayPublish(dev, deviceTopics.readings(dev.code))).toBe(true);
    expect(mayPublish(dev, deviceTopics.status(dev.code))).toBe(true);
    expect(mayPublish(dev, deviceTopics.readings("fm-gravure-1-infeed"))).toBe(false);
    expect(mayPublish(dev, deviceTopics.command(dev.code))).toBe(false);
    expect(mayPublish(dev, internalTopics.liveLine(1))).toBe(false);
    expect(mayPublish(dev, internalTopics.alerts)).toBe(false);
    expect(mayPublish(dev, "$SYS/broker/x")).toBe(false);
  });
  it("lets a device subscribe to its command topic only", () => {
    expect(maySubscribe(dev, deviceTopics.command(dev.code))).toBe(true);
    for (const f of ["#", "stillfield/#", "stillfield/internal/#", internalTopics.liveLine(1), "stillfield/d/+/cmd", deviceTopics.command("other"), deviceTopics.readings(dev.code)]) {
      expect(maySubscribe(dev, f)).toBe(false);
    }
  });
  it("gives the worker's account device topics to read and internal topics (and commands) to write", () => {
    expect(maySubscribe(worker, "stillfield/d/+/readings")).toBe(true);
    expect(maySubscribe(worker, "stillfield/d/+/status")).toBe(true);
    expect(mayPublish(worker, internalTopics.liveLine(1))).toBe(true);
    expect(mayPublish(worker, internalTopics.alerts)).toBe(true);
    expect(mayPublish(worker, deviceTopics.command(dev.code))).toBe(true);
    expect(mayPublish(worker, deviceTopics.readings(dev.code))).toBe(false);
    expect(mayPublish(worker, deviceTopics.status(dev.code))).toBe(false);
    expect(maySubscribe(worker, "stillfield/internal/#")).toBe(false);
    expect(maySubscribe(worker, "#")).toBe(false);
    expect(mayPublish(worker, "$SYS/x")).toBe(false);
  });
  it("lets the app's account read internal topics and write alert changes only", () => {
    expect(maySubscribe(app, "stillfield/internal/live/#")).toBe(true);
    expect(maySubscribe(app, internalTopics.alerts)).toBe(true);
    expect(mayPublish(app, internalTopics.alerts)).toBe(true);
    for (const t of [deviceTopics.readings(dev.code), deviceTopics.status(dev.code), deviceTopics.command(dev.code), internalTopics.liveLine(1), internalTopics.liveArea(1), internalTopics.devices]) {
      expect(mayPublish(app, t)).toBe(false);
    }
    for (const f of ["stillfield/d/+/readings", "stillfield/#", "#"]) expect(maySubscribe(app, f)).toBe(false);
  });
});
