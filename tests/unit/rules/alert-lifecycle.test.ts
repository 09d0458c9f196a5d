/**
 * Alert states per ISA-18.2 / IEC 62682 (alarm state transition diagram: normal, unacknowledged,
 * acknowledged, return-to-normal unacknowledged; shelving as a time-limited suppression with a
 * reason). Here "closed" stands for normal-and-acknowledged.
 */
import { describe, expect, it } from "vitest";
import {
  MAX_SHELVE_MS,
  alertActionSchema,
  applyAlertAction,
  createAlertLifecycle,
  expireShelve,
  isShelvedAt,
  type AlertAction,
  type AlertLifecycleState,
} from "../../../lib/rules/alert-lifecycle";
import { MIN, T0 } from "./fixtures";

const LEAD = 41; // a shift lead's user id (invented)

/** Apply actions in turn, failing the test on the first error. */
function applyAll(state: AlertLifecycleState, actions: AlertAction[]): AlertLifecycleState {
  let current = state;
  for (const action of actions) {
    const result = applyAlertAction(current, action);
    expect(result.error).toBeUndefined();
    current = result.state;
  }
  return current;
}

describe("alert lifecycle: valid paths", () => {
  it("active_unacked -> ack -> active_acked -> clear -> closed", () => {
    const raised = createAlertLifecycle(T0);
    expect(raised.state).toBe("active_unacked");
    const acked = applyAlertAction(raised, { type: "ack", ts: T0 + 2 * MIN, actorId: LEAD });
    expect(acked.state).toMatchObject({ state: "active_acked", ackedTs: T0 + 2 * MIN, ackedBy: LEAD });
    const closed = applyAlertAction(acked.state, { type: "clear", ts: T0 + 10 * MIN });
    expect(closed.state).toMatchObject({ state: "closed", clearedTs: T0 + 10 * MIN, closedTs: T0 + 10 * MIN, ackedBy: LEAD });
  });

  it("active_unacked -> clear -> cleared_unacked -> ack -> closed", () => {
    const cleared = applyAlertAction(createAlertLifecycle(T0), { type: "clear", ts: T0 + 5 * MIN });
    expect(cleared.state).toMatchObject({ state: "cleared_unacked", clearedTs: T0 + 5 * MIN, closedTs: null });
    const closed = applyAlertAction(cleared.state, { type: "ack", ts: T0 + 7 * MIN, actorId: LEAD });
    expect(closed.state).toMatchObject({ state: "closed", ackedTs: T0 + 7 * MIN, closedTs: T0 + 7 * MIN, clearedTs: T0 + 5 * MIN });
  });

  it("does not change the state it is given", () => {
    const raised = createAlertLifecycle(T0);
    applyAlertAction(raised, { type: "ack", ts: T0 + MIN });
    expect(raised.state).toBe("active_unacked");
    expect(raised.ackedTs).toBeNull();
  });
});

describe("alert lifecycle: invalid transitions are refused with a reason", () => {
  const closed = applyAll(createAlertLifecycle(T0), [
    { type: "ack", ts: T0 + MIN },
    { type: "clear", ts: T0 + 2 * MIN },
  ]);

  it("acknowledging a closed alert", () => {
    const result = applyAlertAction(closed, { type: "ack", ts: T0 + 3 * MIN });
    expect(result.error).toEqual({ code: "alert_closed", message: "This alert is closed and cannot be acknowledged" });
    expect(result.state).toBe(closed);
  });

  it("clearing or shelving a closed alert", () => {
    expect(applyAlertAction(closed, { type: "clear", ts: T0 + 3 * MIN }).error?.code).toBe("alert_closed");
    expect(
      applyAlertAction(closed, { type: "shelve", ts: T0 + 3 * MIN, untilTs: T0 + 60 * MIN, reason: "bar being cleaned" }).error?.code,
    ).toBe("alert_closed");
  });

  it("acknowledging twice", () => {
    const acked = applyAll(createAlertLifecycle(T0), [{ type: "ack", ts: T0 + MIN }]);
    const again = applyAlertAction(acked, { type: "ack", ts: T0 + 2 * MIN });
    expect(again.error?.code).toBe("already_acknowledged");
    expect(again.state).toBe(acked);
  });

  it("clearing twice", () => {
    const cleared = applyAll(createAlertLifecycle(T0), [{ type: "clear", ts: T0 + MIN }]);
    expect(applyAlertAction(cleared, { type: "clear", ts: T0 + 2 * MIN }).error?.code).toBe("already_cleared");
  });

  it("unshelving an alert that is not shelved", () => {
    expect(applyAlertAction(createAlertLifecycle(T0), { type: "unshelve", ts: T0 + MIN }).error).toEqual({
      code: "not_shelved",
      message: "This alert is not shelved",
    });
  });

  it("shelving without a reason, with an end not after the start, or for longer than 7 days", () => {
    const raised = createAlertLifecycle(T0);
    expect(applyAlertAction(raised, { type: "shelve", ts: T0, untilTs: T0 + 60 * MIN, reason: "   " }).error?.code).toBe("reason_required");
    expect(applyAlertAction(raised, { type: "shelve", ts: T0 + MIN, untilTs: T0 + MIN, reason: "x" }).error?.code).toBe(
      "shelve_end_not_in_future",
    );
    expect(applyAlertAction(raised, { type: "shelve", ts: T0, untilTs: T0 + MAX_SHELVE_MS + 1, reason: "x" }).error?.code).toBe(
      "shelve_too_long",
    );
    expect(applyAlertAction(raised, { type: "shelve", ts: T0, untilTs: T0 + MAX_SHELVE_MS, reason: "x" }).error).toBeUndefined();
  });

  it("an action dated before the alert was raised", () => {
    expect(applyAlertAction(createAlertLifecycle(T0), { type: "ack", ts: T0 - 1 }).error?.code).toBe("before_raise");
  });
});

describe("alert lifecycle: shelving", () => {
  const shelve: AlertAction = { type: "shelve", ts: T0 + MIN, untilTs: T0 + 61 * MIN, reason: "Cleaning bar at unwind", actorId: LEAD };

  it("is an attribute beside the state: a shelved alert can be acknowledged and cleared", () => {
    const shelved = applyAll(createAlertLifecycle(T0), [shelve]);
    expect(shelved).toMatchObject({
      state: "active_unacked",
      shelved: true,
      shelvedTs: T0 + MIN,
      shelvedUntilTs: T0 + 61 * MIN,
      shelvedReason: "Cleaning bar at unwind",
      shelvedBy: LEAD,
    });
    const acked = applyAll(shelved, [{ type: "ack", ts: T0 + 2 * MIN }]);
    expect(acked).toMatchObject({ state: "active_acked", shelved: true });
    // Closing ends the shelving.
    const closed = applyAll(acked, [{ type: "clear", ts: T0 + 3 * MIN }]);
    expect(closed).toMatchObject({ state: "closed", shelved: false, shelvedUntilTs: null, shelvedReason: null });
  });

  it("can be ended by hand", () => {
    const shelved = applyAll(createAlertLifecycle(T0), [shelve]);
    expect(applyAll(shelved, [{ type: "unshelve", ts: T0 + 5 * MIN }])).toMatchObject({ shelved: false, shelvedUntilTs: null });
  });

  it("expires on its own at shelvedUntilTs", () => {
    const shelved = applyAll(createAlertLifecycle(T0), [shelve]);
    expect(isShelvedAt(shelved, T0 + 60 * MIN)).toBe(true);
    expect(isShelvedAt(shelved, T0 + 61 * MIN)).toBe(false);
    expect(expireShelve(shelved, T0 + 60 * MIN)).toBe(shelved);
    expect(expireShelve(shelved, T0 + 61 * MIN)).toMatchObject({ shelved: false, state: "active_unacked" });

    expect(applyAlertAction(shelved, { type: "expire_shelve", ts: T0 + 30 * MIN }).error?.code).toBe("shelve_not_expired");
    const expired = applyAlertAction(shelved, { type: "expire_shelve", ts: T0 + 61 * MIN });
    expect(expired).toMatchObject({ shelveExpired: true, state: { shelved: false } });
    expect(applyAlertAction(expired.state, { type: "expire_shelve", ts: T0 + 62 * MIN }).error?.code).toBe("not_shelved");
  });

  it("an action after the shelving ran out sees it ended first", () => {
    const shelved = applyAll(createAlertLifecycle(T0), [shelve]);
    const acked = applyAlertAction(shelved, { type: "ack", ts: T0 + 90 * MIN });
    expect(acked.shelveExpired).toBe(true);
    expect(acked.state).toMatchObject({ state: "active_acked", shelved: false });
    const lateUnshelve = applyAlertAction(shelved, { type: "unshelve", ts: T0 + 90 * MIN });
    expect(lateUnshelve.error).toEqual({ code: "not_shelved", message: "The shelving has already run out" });
  });

  it("shelving again replaces the end time and reason", () => {
    const shelved = applyAll(createAlertLifecycle(T0), [
      shelve,
      { type: "shelve", ts: T0 + 30 * MIN, untilTs: T0 + 120 * MIN, reason: "Waiting for spare power unit" },
    ]);
    expect(shelved).toMatchObject({ shelvedUntilTs: T0 + 120 * MIN, shelvedReason: "Waiting for spare power unit", shelvedBy: null });
  });
});

describe("alertActionSchema (API boundary)", () => {
  it("parses a shelve request and trims its reason", () => {
    const parsed = alertActionSchema.parse({ type: "shelve", ts: T0, untilTs: T0 + MIN, reason: "  new roll of film  ", actorId: LEAD });
    expect(parsed).toMatchObject({ type: "shelve", reason: "new roll of film" });
  });

  it("rejects unknown actions and missing fields", () => {
    expect(alertActionSchema.safeParse({ type: "delete", ts: T0 }).success).toBe(false);
    expect(alertActionSchema.safeParse({ type: "shelve", ts: T0, reason: "x" }).success).toBe(false);
    expect(alertActionSchema.safeParse({ type: "ack", ts: "yesterday" }).success).toBe(false);
  });
});
