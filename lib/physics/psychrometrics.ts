/**
 * Psychrometrics of moist air: saturation vapour pressure over water and ice, vapour pressure,
 * dew and frost point, humidity ratio, absolute humidity, moist-air density, indoor RH after
 * heating outdoor air, and the water a humidifier must add.
 *
 * Source throughout: ASHRAE Handbook—Fundamentals 2017 (SI), chapter 1 "Psychrometrics"
 * (saturation pressure from Hyland & Wexler 1983, eqs. 5 and 6; perfect-gas relations,
 * eqs. 1, 2, 11, 20, 26). The same equations and coefficients are used by the `psychrolib`
 * package, which the unit tests compare against.
 *
 * Pure functions, no I/O. Units are in every name: °C, Pa, %, kg/kg, g/m³, kg/h.
 * Impossible inputs (RH outside 0–100 %, temperatures outside the equations' range,
 * non-finite numbers, pressure not above the vapour pressure) throw a RangeError.
 */

/** Kelvin at 0 °C. */
export const ZERO_CELSIUS_K = 273.15;

/** Triple point of water, °C. Ice exists only at or below this temperature. */
export const TRIPLE_POINT_C = 0.01;

/**
 * Vapour pressure at the triple point, Pa (IAPWS: 611.657 Pa). Eqs. 5 and 6 both give
 * 611.657 Pa at 0.01 °C, which is why the switch between them is made at the triple point,
 * not at 0 °C (the psychrolib authors make the same choice).
 */
export const TRIPLE_POINT_PRESSURE_PA = 611.657;

/** Standard atmosphere at sea level, Pa (ASHRAE 2017 ch. 1, Table 1). */
export const STANDARD_PRESSURE_PA = 101325;

/** Gas constant of dry air, J/(kg·K): 8314.472 / 28.966 (ASHRAE 2017 ch. 1 eq. 1). */
export const R_DRY_AIR_J_PER_KG_K = 287.042;

/**
 * Gas constant of water vapour, J/(kg·K): 8314.472 / 18.015268 (ASHRAE 2017 ch. 1 eq. 2);
 * often rounded to 461.5.
 */
export const R_WATER_VAPOUR_J_PER_KG_K = 461.524;

/** Ratio of molecular masses of water and dry air, 18.015268 / 28.966 (ASHRAE 2017 eq. 20). */
export const MOLECULAR_MASS_RATIO_WATER_AIR = 0.621945;

/** Lowest and highest temperatures of the Hyland–Wexler equations as ASHRAE gives them. */
export const MIN_TEMP_C = -100;
export const MAX_TEMP_C = 200;

/**
 * What a saturation pressure (and so an RH) is taken over.
 * - 'water': over liquid water at every temperature (below 0 °C, supercooled water). This is the
 *   meteorological convention (WMO): weather services and most hygrometers report RH over water.
 * - 'ice': over ice. For `saturationPressurePa` this is strict (only at or below 0.01 °C).
 *   For functions that take an RH, 'ice' means "over ice below 0.01 °C, over water above",
 *   because above the triple point there is no ice and RH is always over water.
 * - 'ashrae': over ice at or below 0.01 °C, over water above: the ASHRAE table convention,
 *   also used by psychrolib.
 */
export type SaturationBasis = "water" | "ice" | "ashrae";

function assertFinite(name: string, value: number): void {
  if (typeof value !== "number" || !Number.isFinite(value)) {
    throw new RangeError(`${name} must be a finite number (got ${String(value)}).`);
  }
}

function assertTempInRange(name: string, tempC: number, minC: number, maxC: number): void {
  assertFinite(name, tempC);
  if (tempC < minC || tempC > maxC) {
    throw new RangeError(`${name} must be between ${minC} and ${maxC} °C (got ${tempC}).`);
  }
}

function assertRhPct(name: string, rhPct: number): void {
  assertFinite(name, rhPct);
  if (rhPct < 0 || rhPct > 100) {
    throw new RangeError(`${name} must be between 0 and 100 % (got ${rhPct}).`);
  }
}

function assertPressurePa(pressurePa: number): void {
  assertFinite("Pressure", pressurePa);
  if (pressurePa <= 0) {
    throw new RangeError(`Pressure must be above 0 Pa (got ${pressurePa}).`);
  }
}

/** ln of eq. 6 (over water), T in kelvin. */
function lnSaturationOverWater(tempK: number): number {
  return (
    -5.8002206e3 / tempK +
    1.3914993 -
    4.8640239e-2 * tempK +
    4.1764768e-5 * tempK * tempK -
    1.4452093e-8 * tempK * tempK * tempK +
    6.5459673 * Math.log(tempK)
  );
}

/** ln of eq. 5 (over ice), T in kelvin. */
function lnSaturationOverIce(tempK: number): number {
  return (
    -5.6745359e3 / tempK +
    6.3925247 -
    9.677843e-3 * tempK +
    6.2215701e-7 * tempK * tempK +
    2.0747825e-9 * tempK * tempK * tempK -
    9.484024e-13 * tempK * tempK * tempK * tempK +
    4.1635019 * Math.log(tempK)
  );
}

/**
 * Saturation vapour pressure over liquid water, Pa.
 *
 * Formula (ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 6, Hyland & Wexler 1983), T in K:
 *   ln pws = C8/T + C9 + C10·T + C11·T² + C12·T³ + C13·ln T
 *   C8 = −5.8002206e3, C9 = 1.3914993, C10 = −4.8640239e−2, C11 = 4.1764768e−5,
 *   C12 = −1.4452093e−8, C13 = 6.5459673.
 * ASHRAE gives it for 0 to 200 °C. Below 0 °C (supercooled water) it is used as an
 * extrapolation, which is what the 'water' RH convention needs; accepted down to −100 °C.
 */
export function saturationPressureOverWaterPa(tempC: number): number {
  assertTempInRange("Temperature", tempC, MIN_TEMP_C, MAX_TEMP_C);
  return Math.exp(lnSaturationOverWater(tempC + ZERO_CELSIUS_K));
}

/**
 * Saturation vapour pressure over ice, Pa.
 *
 * Formula (ASHRAE Handbook—Fundamentals 2017, ch. 1, eq. 5, Hyland & Wexler 1983), T in K:
 *   ln pws = C1/T + C2 + C3·T + C4·T² + C5·T³ + C6·T⁴ + C7·ln T
 *   C1 = −5.6745359e3, C2 = 6.3925247, C3 = −9.677843e−3, C4 = 6.2215701e−7,
 *   C5 = 2.0747825e−9, C6 = −9.484024e−13, C7 = 4.1635019.
 * Valid from −100 °C up to the triple point, 0.01 °C; above it there is no ice and this throws.
 */
export function saturationPressureOverIcePa(tempC: number): number {
  assertTempInRange("Temperature over ice", tempC, MIN_TEMP_C, TRIPLE_POINT_C);
  return Math.exp(lnSaturationOverIce(tempC + ZERO_CELSIUS_K));
}

/**
 * Saturation vapour pressure, Pa, on the chosen basis (see `SaturationBasis`):
 * 'water' → eq. 6; 'ice' → eq. 5 (only up to 0.01 °C); 'ashrae' → eq. 5 at or below 0.01 °C and
 * eq. 6 above, as ASHRAE 2017 ch. 1 Table 3 and psychrolib's GetSatVapPres do.
 */
export function saturationPressurePa(tempC: number, basis: SaturationBasis = "ashrae"): number {
  switch (basis) {
    case "water":
      return saturationPressureOverWaterPa(tempC);
    case "ice":
      return saturationPressureOverIcePa(tempC);
    case "ashrae":
      assertTempInRange("Temperature", tempC, MIN_TEMP_C, MAX_TEMP_C);
      return tempC <= TRIPLE_POINT_C
        ? saturationPressureOverIcePa(tempC)
        : saturationPressureOverWaterPa(tempC);
    default: {
      const never: never = basis;
      throw new RangeError(`Unknown saturation basis: ${String(never)}.`);
    }
  }
}

/**
 * Saturation pressure that an RH at `tempC` is relative to. Above 0.01 °C RH is over water on
 * every basis; at or below it, 'water' keeps water and 'ice'/'ashrae' use ice.
 */
function rhReferencePressurePa(tempC: number, basis: SaturationBasis): number {
  if (basis === "water") return saturationPressureOverWaterPa(tempC);
  return saturationPressurePa(tempC, "ashrae");
}

/**
 * Partial pressure of water vapour, Pa: pw = (RH/100) · pws(T).
 * Definition of relative humidity, ASHRAE 2017 ch. 1 eq. 22 (φ = pw / pws at the same T and p).
 * `basis` says what RH below 0.01 °C is relative to; above 0.01 °C it is always over water.
 */
export function vapourPressurePa(
  tempC: number,
  rhPct: number,
  basis: SaturationBasis = "ashrae",
): number {
  assertRhPct("Relative humidity", rhPct);
  return (rhPct / 100) * rhReferencePressurePa(tempC, basis);
}

/**
 * Relative humidity, %, of air at `tempC` holding water vapour at `vapourPressurePaValue`:
 * RH = 100 · pw / pws(T) (ASHRAE 2017 ch. 1 eq. 22). Not capped: a value above 100 means the
 * vapour pressure is above saturation (the air would condense or deposit frost).
 */
export function relativeHumidityFromVapourPressurePct(
  tempC: number,
  vapourPressurePaValue: number,
  basis: SaturationBasis = "ashrae",
): number {
  assertFinite("Vapour pressure", vapourPressurePaValue);
  if (vapourPressurePaValue < 0) {
    throw new RangeError(`Vapour pressure cannot be negative (got ${vapourPressurePaValue}).`);
  }
  return (100 * vapourPressurePaValue) / rhReferencePressurePa(tempC, basis);
}

/**
 * Inverse of a saturation curve by bisection on ln p (monotonic in T): the temperature in
 * [lowC, highC] at which `lnSat(T)` equals ln(pressurePa). Bisection is slower than Newton but
 * cannot diverge; 200 halvings of a 300 K bracket is far below floating-point resolution.
 */
function solveSaturationTempC(
  pressurePa: number,
  lnSat: (tempK: number) => number,
  lowC: number,
  highC: number,
): number {
  const target = Math.log(pressurePa);
  let lo = lowC;
  let hi = highC;
  for (let i = 0; i < 200 && hi - lo > 1e-10; i++) {
    const mid = (lo + hi) / 2;
    if (lnSat(mid + ZERO_CELSIUS_K) < target) lo = mid;
    else hi = mid;
  }
  return (lo + hi) / 2;
}

/**
 * Dew point over liquid water, °C: the temperature Td with pws,water(Td) = pw, solved by bisection
 * on ASHRAE 2017 ch. 1 eq. 6 (Hyland–Wexler). pw comes from `vapourPressurePa(tempC, rhPct, basis)`.
 *
 * Below 0 °C this is the dew point over supercooled water (the meteorological dew point).
 * For the temperature at which frost forms use `frostPointC`; for the ASHRAE/psychrolib
 * convention (over ice below 0.01 °C) use `dewOrFrostPointC`.
 * RH must be above 0 % (dry air has no dew point).
 */
export function dewPointC(tempC: number, rhPct: number, basis: SaturationBasis = "ashrae"): number {
  const pwPa = vapourPressurePa(tempC, rhPct, basis);
  if (rhPct <= 0) throw new RangeError("Relative humidity must be above 0 % for a dew point.");
  if (pwPa < saturationPressureOverWaterPa(MIN_TEMP_C)) {
    throw new RangeError(`Dew point is below ${MIN_TEMP_C} °C, outside the equations' range.`);
  }
  return solveSaturationTempC(pwPa, lnSaturationOverWater, MIN_TEMP_C, MAX_TEMP_C);
}

/**
 * Frost point over ice, °C: the temperature Tf with pws,ice(Tf) = pw, solved by bisection on
 * ASHRAE 2017 ch. 1 eq. 5 (Hyland–Wexler). Only meaningful when the vapour pressure is below the
 * triple-point pressure (611.657 Pa), i.e. the frost point is at or below 0.01 °C — in practice for
 * air below about 0 °C or very dry air; otherwise this throws (the air reaches its dew point over
 * water first). `basis` says what the given RH is relative to (see `vapourPressurePa`).
 */
export function frostPointC(
  tempC: number,
  rhPct: number,
  basis: SaturationBasis = "ashrae",
): number {
  const pwPa = vapourPressurePa(tempC, rhPct, basis);
  if (rhPct <= 0) throw new RangeError("Relative humidity must be above 0 % for a frost point.");
  if (pwPa > TRIPLE_POINT_PRESSURE_PA) {
    throw new RangeError(
      "No frost point: the vapour pressure is above the triple-point pressure, so the air reaches its dew point over water first.",
    );
  }
  if (pwPa < saturationPressureOverIcePa(MIN_TEMP_C)) {
    throw new RangeError(`Frost point is below ${MIN_TEMP_C} °C, outside the equations' range.`);
  }
  return solveSaturationTempC(pwPa, lnSaturationOverIce, MIN_TEMP_C, TRIPLE_POINT_C);
}

/**
 * Dew point on the ASHRAE convention, °C: over ice (a frost point) when the vapour pressure is
 * below the triple-point pressure, over water above it — the inverse of `saturationPressurePa(…,
 * 'ashrae')`. This is what psychrolib's GetTDewPointFromRelHum returns (ASHRAE 2017 ch. 1 eq. 5/6
 * inverted).
 */
export function dewOrFrostPointC(
  tempC: number,
  rhPct: number,
  basis: SaturationBasis = "ashrae",
): number {
  const pwPa = vapourPressurePa(tempC, rhPct, basis);
  return pwPa > TRIPLE_POINT_PRESSURE_PA
    ? dewPointC(tempC, rhPct, basis)
    : frostPointC(tempC, rhPct, basis);
}

/**
 * Humidity ratio, kg water per kg dry air, from vapour pressure:
 *   W = 0.621945 · pw / (p − pw)   (ASHRAE 2017 ch. 1 eq. 20).
 */
export function humidityRatioFromVapourPressureKgPerKg(
  vapourPressurePaValue: number,
  pressurePa: number = STANDARD_PRESSURE_PA,
): number {
  assertFinite("Vapour pressure", vapourPressurePaValue);
  assertPressurePa(pressurePa);
  if (vapourPressurePaValue < 0) {
    throw new RangeError(`Vapour pressure cannot be negative (got ${vapourPressurePaValue}).`);
  }
  if (vapourPressurePaValue >= pressurePa) {
    throw new RangeError("Vapour pressure must be below the total pressure.");
  }
  return (MOLECULAR_MASS_RATIO_WATER_AIR * vapourPressurePaValue) / (pressurePa - vapourPressurePaValue);
}

/**
 * Vapour pressure from humidity ratio, Pa: pw = p · W / (0.621945 + W)
 * (ASHRAE 2017 ch. 1 eq. 20 solved for pw).
 */
export function vapourPressureFromHumidityRatioPa(
  humidityRatioKgPerKgValue: number,
  pressurePa: number = STANDARD_PRESSURE_PA,
): number {
  assertFinite("Humidity ratio", humidityRatioKgPerKgValue);
  assertPressurePa(pressurePa);
  if (humidityRatioKgPerKgValue < 0) {
    throw new RangeError(`Humidity ratio cannot be negative (got ${humidityRatioKgPerKgValue}).`);
  }
  return (pressurePa * humidityRatioKgPerKgValue) / (MOLECULAR_MASS_RATIO_WATER_AIR + humidityRatioKgPerKgValue);
}

/**
 * Humidity ratio, kg water per kg dry air, of air at `tempC` and `rhPct`:
 *   W = 0.621945 · pw / (p − pw), pw = (RH/100) · pws(T)   (ASHRAE 2017 ch. 1 eqs. 20 and 22).
 */
export function humidityRatioKgPerKg(
  tempC: number,
  rhPct: number,
  pressurePa: number = STANDARD_PRESSURE_PA,
  basis: SaturationBasis = "ashrae",
): number {
  return humidityRatioFromVapourPressureKgPerKg(vapourPressurePa(tempC, rhPct, basis), pressurePa);
}

/**
 * Relative humidity, %, of air at `tempC` with humidity ratio W:
 *   RH = 100 · pw / pws(T), pw = p · W / (0.621945 + W)   (ASHRAE 2017 ch. 1 eqs. 20 and 22).
 * Not capped at 100 % (see `relativeHumidityFromVapourPressurePct`).
 */
export function rhFromHumidityRatioPct(
  tempC: number,
  humidityRatioKgPerKgValue: number,
  pressurePa: number = STANDARD_PRESSURE_PA,
  basis: SaturationBasis = "ashrae",
): number {
  return relativeHumidityFromVapourPressurePct(
    tempC,
    vapourPressureFromHumidityRatioPa(humidityRatioKgPerKgValue, pressurePa),
    basis,
  );
}

/**
 * Absolute humidity (water-vapour density), g/m³, ideal gas:
 *   ρw = pw / (Rw · T) · 1000,  Rw = 461.524 J/(kg·K)   (ASHRAE 2017 ch. 1 eq. 2; ≈ 461.5).
 */
export function absoluteHumidityGPerM3(
  tempC: number,
  rhPct: number,
  basis: SaturationBasis = "ashrae",
): number {
  const pwPa = vapourPressurePa(tempC, rhPct, basis);
  return (1000 * pwPa) / (R_WATER_VAPOUR_J_PER_KG_K * (tempC + ZERO_CELSIUS_K));
}

/**
 * Specific volume of moist air per kg of dry air, m³/kg_da:
 *   v = Rda · T · (1 + 1.607858 · W) / p   (ASHRAE 2017 ch. 1 eq. 26, p in Pa).
 */
export function moistAirVolumeM3PerKgDryAir(
  tempC: number,
  humidityRatioKgPerKgValue: number,
  pressurePa: number = STANDARD_PRESSURE_PA,
): number {
  assertTempInRange("Temperature", tempC, MIN_TEMP_C, MAX_TEMP_C);
  assertFinite("Humidity ratio", humidityRatioKgPerKgValue);
  assertPressurePa(pressurePa);
  if (humidityRatioKgPerKgValue < 0) {
    throw new RangeError(`Humidity ratio cannot be negative (got ${humidityRatioKgPerKgValue}).`);
  }
  return (
    (R_DRY_AIR_J_PER_KG_K * (tempC + ZERO_CELSIUS_K) * (1 + 1.607858 * humidityRatioKgPerKgValue)) /
    pressurePa
  );
}

/**
 * Density of moist air, kg/m³: ρ = (1 + W) / v   (ASHRAE 2017 ch. 1 eq. 11 with eq. 26 for v).
 */
export function moistAirDensityKgPerM3(
  tempC: number,
  rhPct: number,
  pressurePa: number = STANDARD_PRESSURE_PA,
  basis: SaturationBasis = "ashrae",
): number {
  const w = humidityRatioKgPerKg(tempC, rhPct, pressurePa, basis);
  return (1 + w) / moistAirVolumeM3PerKgDryAir(tempC, w, pressurePa);
}

/**
 * Mass flow of dry air, kg_da/h, in a volume flow of moist air measured at (tempC, rhPct, p):
 *   ṁda = V̇ / v   (v from ASHRAE 2017 ch. 1 eq. 26).
 */
export function dryAirMassFlowKgPerH(
  airflowM3PerH: number,
  tempC: number,
  rhPct: number,
  pressurePa: number = STANDARD_PRESSURE_PA,
  basis: SaturationBasis = "ashrae",
): number {
  assertFinite("Airflow", airflowM3PerH);
  if (airflowM3PerH < 0) throw new RangeError(`Airflow cannot be negative (got ${airflowM3PerH}).`);
  const w = humidityRatioKgPerKg(tempC, rhPct, pressurePa, basis);
  return airflowM3PerH / moistAirVolumeM3PerKgDryAir(tempC, w, pressurePa);
}

export interface IndoorRhAfterHeatingInput {
  outdoorTempC: number;
  outdoorRhPct: number;
  indoorTempC: number;
  /**
   * What the outdoor RH is relative to when the outdoor air is at or below 0.01 °C:
   * 'water' (weather-service convention) or 'ice'/'ashrae' (ASHRAE/psychrolib convention).
   * Indoor RH above 0.01 °C is always over water.
   */
  basis: SaturationBasis;
}

/**
 * Indoor relative humidity, %, when outdoor air is brought to the indoor temperature without
 * adding or removing moisture (sensible heating, ASHRAE 2017 ch. 1 "Moist-air sensible heating
 * or cooling": the humidity ratio W is constant).
 *
 * Formula: at the same total pressure, constant W means constant vapour pressure pw, so
 *   RHin = 100 · pw,out / pws(Tin),  pw,out = (RHout/100) · pws(Tout).
 * The outdoor RH below 0.01 °C is taken over water or over ice according to `basis`; the two
 * readings of the same number differ by 10–20 % at −10 to −20 °C, so the caller must say which
 * its data uses (weather services report over water).
 * Assumes indoor and outdoor total pressure are equal. If the "indoor" air is colder than the
 * outdoor dew point, water condenses and the result is capped at 100 %.
 */
export function indoorRhAfterHeatingPct(input: IndoorRhAfterHeatingInput): number {
  const { outdoorTempC, outdoorRhPct, indoorTempC, basis } = input;
  const pwPa = vapourPressurePa(outdoorTempC, outdoorRhPct, basis);
  const rhPct = relativeHumidityFromVapourPressurePct(indoorTempC, pwPa, basis);
  return Math.min(100, rhPct);
}

export interface HumidifierWaterInput {
  /** Volume flow of air to be humidified, m³/h, measured at indoor conditions (indoorTempC, fromRhPct). */
  airflowM3PerH: number;
  indoorTempC: number;
  fromRhPct: number;
  toRhPct: number;
  pressurePa?: number;
}

/**
 * Water a humidifier must add, kg/h, to raise the RH of an air flow from `fromRhPct` to
 * `toRhPct` at constant temperature:
 *   ṁw = ṁda · (W_to − W_from),  ṁda = V̇ / v(T, W_from, p)
 * (ASHRAE 2017 ch. 1: humidity ratio eq. 20/22, specific volume eq. 26, mass balance of the
 * "adiabatic mixing of water injected into moist air" process).
 *
 * Assumptions: the airflow is measured at indoor conditions before humidification, so it is
 * converted to dry-air mass flow with the specific volume at (indoorTempC, fromRhPct); the
 * temperature is held constant (any evaporative cooling is made up by the heating); all the
 * water evaporates. Returns 0 when the target is not above the current RH (nothing to add).
 */
export function humidifierWaterKgPerH(input: HumidifierWaterInput): number {
  const { airflowM3PerH, indoorTempC, fromRhPct, toRhPct } = input;
  const pressurePa = input.pressurePa ?? STANDARD_PRESSURE_PA;
  assertRhPct("Target relative humidity", toRhPct);
  const massFlowDryAirKgPerH = dryAirMassFlowKgPerH(airflowM3PerH, indoorTempC, fromRhPct, pressurePa);
  if (toRhPct <= fromRhPct) return 0;
  const wFrom = humidityRatioKgPerKg(indoorTempC, fromRhPct, pressurePa);
  const wTo = humidityRatioKgPerKg(indoorTempC, toRhPct, pressurePa);
  return massFlowDryAirKgPerH * (wTo - wFrom);
}
