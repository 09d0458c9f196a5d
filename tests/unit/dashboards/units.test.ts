// Units and number formats shown on every live screen (lib/units.ts).
import { describe, expect, it } from "vitest";
import {
  celsiusToFahrenheit,
  chargePolarity,
  chargeToKv,
  formatCharge,
  formatChargeLimit,
  formatRh,
  formatSpeed,
  formatTemp,
  MINUS,
  parseUnitPrefs,
} from "@/lib/units";

describe("charge", () => {
  it("always shows the sign, with a true minus, one decimal in kV", () => {
    expect(formatCharge(3.44)).toBe("+3.4");
    expect(formatCharge(-12)).toBe(`${MINUS}12.0`);
    expect(formatCharge(-0.04)).toBe("0.0");
    expect(formatCharge(0)).toBe("0.0");
    expect(formatCharge(7.25, "kV", { withUnit: true })).toBe("+7.3 kV");
  });

  it("converts to volts on request (1 kV = 1000 V, SI prefix)", () => {
    expect(formatCharge(-3.4, "V")).toBe(`${MINUS}3,400`);
    expect(formatCharge(0.0124, "V", { withUnit: true })).toBe("+12 V");
    expect(chargeToKv(-2500, "V")).toBe(-2.5);
    expect(chargeToKv(2.5, "kV")).toBe(2.5);
  });

  it("names the polarity by what is shown, so −0.0 is not called negative", () => {
    expect(chargePolarity(4)).toBe("pos");
    expect(chargePolarity(-4)).toBe("neg");
    expect(chargePolarity(-0.04)).toBe("zero");
    expect(chargePolarity(-0.04, "V")).toBe("neg");
  });

  it("shows a limit as a magnitude with both signs", () => {
    expect(formatChargeLimit(12)).toBe("±12.0 kV");
    expect(formatChargeLimit(-12, "V")).toBe("±12,000 V");
  });

  it("never prints NaN", () => {
    expect(formatCharge(Number.NaN)).toBe("–");
    expect(formatTemp(Number.POSITIVE_INFINITY)).toBe("–");
  });
});

describe("temperature, humidity, speed", () => {
  it("converts °C to °F by F = C × 9/5 + 32 (definition of the Fahrenheit scale)", () => {
    expect(celsiusToFahrenheit(0)).toBe(32); // freezing point of water
    expect(celsiusToFahrenheit(100)).toBe(212); // boiling point at 1 atm
    expect(celsiusToFahrenheit(-40)).toBe(-40); // the two scales meet at −40
    expect(formatTemp(21.5, "F")).toBe("70.7 °F");
    expect(formatTemp(-3.25)).toBe(`${MINUS}3.3 °C`);
  });

  it("keeps a decimal for very dry air only", () => {
    expect(formatRh(38.4)).toBe("38 %");
    expect(formatRh(8.44)).toBe("8.4 %");
    expect(formatSpeed(248.6)).toBe("249 m/min");
    expect(formatSpeed(1200)).toBe("1,200 m/min");
  });

  it("reads stored preferences, falling back to the plant's defaults", () => {
    expect(parseUnitPrefs({ chargeUnit: "V", tempUnit: "F" })).toEqual({ chargeUnit: "V", tempUnit: "F" });
    expect(parseUnitPrefs({ chargeUnit: "MV" }, { chargeUnit: "kV", tempUnit: "C" })).toEqual({ chargeUnit: "kV", tempUnit: "C" });
    expect(parseUnitPrefs("junk")).toEqual({ chargeUnit: "kV", tempUnit: "C" });
  });
});
