// Alert e-mails (lib/mail/alert-emails.ts): what, where, since when, the peak, the state code
// (the same shape and word as the screens) and the link to the line page at that time.
import { describe, expect, it } from "vitest";
import { composeAlertEmail, composeDigestEmail, type AlertMailInput } from "../../../lib/mail/alert-emails";
import { STATE_SYMBOLS, STATE_WORDS, alertStateCode, formatAlertValue, stateCodeText } from "@/lib/vocabulary";

const T0 = Date.UTC(2026, 0, 12, 14, 2); // 14:02 in London (UTC+0 in January)

const base: AlertMailInput = {
  alertId: 17,
  kind: "charge_high",
  severity: "high",
  state: "active_unacked",
  message: "Charge −22.4 kV at Unwind on Gravure Press 1, over the 20 kV limit",
  startTs: T0,
  peakValue: -23.14,
  expectedCrossingTs: null,
  areaName: "Press Hall",
  lineName: "Gravure Press 1",
  pointName: "Unwind",
  where: "Press Hall › Gravure Press 1 › Unwind",
  linkLineId: 3,
};
const opts = { level: 1, recipientName: "Dana Fairweather", appUrl: "http://127.0.0.1:3000/", timeZone: "Europe/London", nowMs: T0 + 6 * 60_000, unackedForMs: 6 * 60_000 };

describe("composeAlertEmail", () => {
  it("says what, where, since when and the peak, with the state code of the screens", () => {
    const mail = composeAlertEmail(base, opts);
    expect(mail.subject).toBe("◆ Over: Charge over limit — Press Hall › Gravure Press 1 › Unwind (high)");
    expect(mail.text).toContain("What:    Charge over limit: Charge −22.4 kV at Unwind on Gravure Press 1, over the 20 kV limit");
    expect(mail.text).toContain("Where:   Press Hall › Gravure Press 1 › Unwind");
    expect(mail.text).toContain("Since:   Mon 12 Jan 2026, 14:02 (plant time)");
    expect(mail.text).toContain("Peak:    −23.1 kV");
    expect(mail.text).toContain("not been acknowledged for 6 min");
    expect(mail.html).toContain("<b>◆ Over</b>");
  });

  it("links to the line page at the alert's time", () => {
    const mail = composeAlertEmail(base, opts);
    const link = `http://127.0.0.1:3000/lines/3?at=${T0}`;
    expect(mail.text).toContain(`Open the chart at that time: ${link}`);
    expect(mail.html).toContain(`href="${link}"`);
  });

  it("marks an escalation and says who is next", () => {
    const mail = composeAlertEmail(base, { ...opts, level: 2 });
    expect(mail.subject.startsWith("[Escalated] ")).toBe(true);
    expect(mail.text).toContain("you are next on the on-call list (order 2)");
  });

  it("gives a humidity forecast's expected crossing time", () => {
    const mail = composeAlertEmail({ ...base, kind: "rh_forecast", severity: "medium", peakValue: 34.2, expectedCrossingTs: T0 + 47 * 60_000 }, opts);
    expect(mail.subject.startsWith("▲ Near: Humidity falling toward limit")).toBe(true);
    expect(mail.text).toContain("Expected to cross the limit at: 14:49");
  });

  it("escapes HTML in messages", () => {
    const mail = composeAlertEmail({ ...base, message: "<script>x</script>" }, opts);
    expect(mail.html).not.toContain("<script>");
    expect(mail.html).toContain("&lt;script&gt;");
  });
});

describe("state codes in e-mails", () => {
  it("are the screens' codes (components/ui/state-badge.tsx)", () => {
    expect(stateCodeText("over")).toBe(`${STATE_SYMBOLS.over} ${STATE_WORDS.over}`);
    expect(stateCodeText("shelved")).toBe(`${STATE_SYMBOLS.shelved} ${STATE_WORDS.shelved}`);
  });
  it("map alert kinds and states to one code each", () => {
    expect(alertStateCode({ kind: "charge_high", state: "active_unacked", shelved: false })).toBe("over");
    expect(alertStateCode({ kind: "rh_forecast", state: "active_acked", shelved: false })).toBe("near");
    expect(alertStateCode({ kind: "sensor_silent", state: "active_unacked", shelved: false })).toBe("silent");
    expect(alertStateCode({ kind: "charge_high", state: "active_unacked", shelved: true })).toBe("shelved");
    expect(alertStateCode({ kind: "charge_high", state: "cleared_unacked", shelved: false })).toBe("normal");
    expect(alertStateCode({ kind: "charge_high", state: "closed", shelved: true })).toBe("normal");
  });
});

describe("formatAlertValue", () => {
  it("words each kind's value with its unit", () => {
    expect(formatAlertValue("charge_high", -23.14)).toBe("−23.1 kV");
    expect(formatAlertValue("charge_rate", 3.04)).toBe("3.0 kV/min");
    expect(formatAlertValue("rh_low", 27.44)).toBe("27.4 % RH");
    // durations keep their seconds up to 10 min (lib/vocabulary/durations.ts)
    expect(formatAlertValue("sensor_silent", 372)).toBe("6 min 12 s silent");
    expect(formatAlertValue("effect_loss", -0.6)).toBe("reduction −60 %");
    expect(formatAlertValue("effect_loss", null)).toBe("–");
  });
});

describe("composeDigestEmail", () => {
  it("lists the day's alerts with their links, and says so when there were none", () => {
    const mail = composeDigestEmail([{ ...base, state: "closed", endTs: T0 + 12 * 60_000, shelved: false, chattering: false }], { dayLabel: "Mon 12 Jan 2026", recipientName: "Priya", appUrl: "http://x", timeZone: "Europe/London" });
    expect(mail.subject).toBe("Stillfield daily digest, Mon 12 Jan 2026: 1 alert");
    expect(mail.text).toContain("14:02  ○ OK  High  Charge over limit — Press Hall › Gravure Press 1 › Unwind; peak −23.1 kV; 12 min");
    expect(mail.text).toContain(`http://x/lines/3?at=${T0}`);
    const none = composeDigestEmail([], { dayLabel: "Tue 13 Jan 2026", recipientName: "Priya", appUrl: "http://x", timeZone: "Europe/London" });
    expect(none.subject).toBe("Stillfield daily digest, Tue 13 Jan 2026: no alerts");
  });
});
