// On-call escalation timing (ingest/alerts-escalation.ts planNotification). Expected times are
// worked by hand from the escalation rule in that file's header: first e-mail notifyAfterS after
// the raise, each escalation escalateAfterS after the previous step; default 5 min each.
import { describe, expect, it } from "vitest";
import { planNotification, severitiesAtOrAbove } from "../../../ingest/alerts-escalation";
import { DEFAULT_ALERTING_SETTINGS } from "../../../db/queries/oncall";

const MIN = 60_000;
const T0 = Date.UTC(2026, 0, 12, 6, 0, 0);
const settings = { notifyAfterS: 300, escalateAfterS: 300 };

describe("planNotification", () => {
  it("defaults to 5 minutes before the first e-mail and 5 more before escalating", () => {
    expect(DEFAULT_ALERTING_SETTINGS.notifyAfterS).toBe(300);
    expect(DEFAULT_ALERTING_SETTINGS.escalateAfterS).toBe(300);
    expect(DEFAULT_ALERTING_SETTINGS.notifyMinSeverity).toBe("medium");
  });

  it("counts notifyAfterS from when the alert was shown when it was written after its raise", () => {
    // a silence held back 30 s for its siblings (lib/alerts/dependency-hold.ts), written at T0 + 30 s:
    // people get the full 5 min to acknowledge it, so order 1 is due at T0 + 30 s + 5 min
    const held = { startTs: T0, shownTs: T0 + 30_000, notifiedLevel: 0 };
    expect(planNotification(held, [1, 2, 3], settings, T0 + 5 * MIN)).toBeNull();
    expect(planNotification(held, [1, 2, 3], settings, T0 + 30_000 + 5 * MIN)).toEqual({ order: 1, dueTs: T0 + 30_000 + 5 * MIN });
    // written at once (shown at its raise, or before in clock terms): the raise counts
    expect(planNotification({ startTs: T0, shownTs: T0 - 2000, notifiedLevel: 0 }, [1, 2, 3], settings, T0 + 5 * MIN)).toEqual({ order: 1, dueTs: T0 + 5 * MIN });
  });

  it("e-mails order 1 only once the alert has waited notifyAfterS", () => {
    const alert = { startTs: T0, notifiedLevel: 0 };
    expect(planNotification(alert, [1, 2, 3], settings, T0 + 5 * MIN - 1)).toBeNull();
    expect(planNotification(alert, [1, 2, 3], settings, T0 + 5 * MIN)).toEqual({ order: 1, dueTs: T0 + 5 * MIN });
  });

  it("escalates to order 2 after a further escalateAfterS, then to order 3", () => {
    expect(planNotification({ startTs: T0, notifiedLevel: 1 }, [1, 2, 3], settings, T0 + 10 * MIN - 1)).toBeNull();
    expect(planNotification({ startTs: T0, notifiedLevel: 1 }, [1, 2, 3], settings, T0 + 10 * MIN)).toEqual({ order: 2, dueTs: T0 + 10 * MIN });
    expect(planNotification({ startTs: T0, notifiedLevel: 2 }, [1, 2, 3], settings, T0 + 15 * MIN)).toEqual({ order: 3, dueTs: T0 + 15 * MIN });
  });

  it("stops when everyone on the list has been e-mailed", () => {
    expect(planNotification({ startTs: T0, notifiedLevel: 3 }, [1, 2, 3], settings, T0 + 60 * MIN)).toBeNull();
  });

  it("skips an order nobody holds: with only orders 2 and 3 on call, order 2 is called first", () => {
    expect(planNotification({ startTs: T0, notifiedLevel: 0 }, [2, 3], settings, T0 + 5 * MIN)).toEqual({ order: 2, dueTs: T0 + 5 * MIN });
    expect(planNotification({ startTs: T0, notifiedLevel: 2 }, [2, 3], settings, T0 + 10 * MIN)).toEqual({ order: 3, dueTs: T0 + 10 * MIN });
  });

  it("calls nobody when nobody is on call", () => {
    expect(planNotification({ startTs: T0, notifiedLevel: 0 }, [], settings, T0 + 60 * MIN)).toBeNull();
  });

  it("an alert that waited long (raised from backfilled data) is e-mailed at once, then escalated one step per round", () => {
    const late = T0 + 120 * MIN;
    expect(planNotification({ startTs: T0, notifiedLevel: 0 }, [1, 2], settings, late)?.order).toBe(1);
    expect(planNotification({ startTs: T0, notifiedLevel: 1 }, [1, 2], settings, late)?.order).toBe(2);
  });
});

describe("severitiesAtOrAbove", () => {
  it("lists the severities e-mailed for a minimum", () => {
    expect(severitiesAtOrAbove("low")).toEqual(["low", "medium", "high"]);
    expect(severitiesAtOrAbove("medium")).toEqual(["medium", "high"]);
    expect(severitiesAtOrAbove("high")).toEqual(["high"]);
  });
});
