// Everything is stored metric (°C, kg, L, cm); imperial is a display setting of the farm.
// Exact definitions: 1 lb = 0.453 592 37 kg and 1 yd = 0.9144 m (international yard and pound,
// 1959; UK Weights and Measures Act 1963 s.1(1)); 1 US gal = 231 in³ (NIST Handbook 44 App. C).

import { UNIT_SYSTEMS, type UnitSystem } from "./vocabulary";

export { UNIT_SYSTEMS, type UnitSystem };

export const KG_PER_LB = 0.45359237;
export const CM_PER_INCH = 2.54;
export const M_PER_FOOT = 0.3048;
// 231 in³ × (2.54 cm)³ = 3785.411784 cm³
export const LITRES_PER_US_GALLON = 3.785411784;
// (3.048 dm)³
export const LITRES_PER_CUBIC_FOOT = 28.316846592;

export const celsiusToFahrenheit = (c: number): number => (c * 9) / 5 + 32;
export const fahrenheitToCelsius = (f: number): number => ((f - 32) * 5) / 9;
// A difference or a rate (°C/h) has no offset.
export const celsiusDeltaToFahrenheit = (dc: number): number => (dc * 9) / 5;
export const fahrenheitDeltaToCelsius = (df: number): number => (df * 5) / 9;

export const kgToLb = (kg: number): number => kg / KG_PER_LB;
export const lbToKg = (lb: number): number => lb * KG_PER_LB;

export const litresToUsGallons = (l: number): number => l / LITRES_PER_US_GALLON;
export const usGallonsToLitres = (gal: number): number => gal * LITRES_PER_US_GALLON;
export const litresToCubicFeet = (l: number): number => l / LITRES_PER_CUBIC_FOOT;
export const cubicFeetToLitres = (ft3: number): number => ft3 * LITRES_PER_CUBIC_FOOT;

export const cmToInches = (cm: number): number => cm / CM_PER_INCH;
export const inchesToCm = (inches: number): number => inches * CM_PER_INCH;

/** Symbols shown after a number, per display setting. */
export const UNIT_LABELS = {
  metric: { temperature: "°C", mass: "kg", volume: "L", length: "cm", rate: "°C/h" },
  imperial: { temperature: "°F", mass: "lb", volume: "US gal", length: "in", rate: "°F/h" },
} as const satisfies Record<UnitSystem, Record<string, string>>;

/** A conversion that applies only on an imperial farm; metric values pass as they are. */
const onImperial =
  (convert: (value: number) => number) =>
  (value: number, system: UnitSystem): number =>
    system === "metric" ? value : convert(value);

/** Values entered in the farm's units, converted to what we store. */
export const temperatureToCelsius = onImperial(fahrenheitToCelsius);
export const massToKg = onImperial(lbToKg);
export const volumeToLitres = onImperial(usGallonsToLitres);
export const lengthToCm = onImperial(inchesToCm);

/** Stored values converted to the farm's units, unrounded (for charts and inputs). */
export const temperatureForDisplay = onImperial(celsiusToFahrenheit);
export const massForDisplay = onImperial(kgToLb);
export const volumeForDisplay = onImperial(litresToUsGallons);
export const lengthForDisplay = onImperial(cmToInches);

/** What a screen shows for a missing or broken number. */
export const NO_VALUE = "—";

/** Fixed decimals without "-0.0". */
export function formatNumber(value: number, digits = 1): string {
  if (!Number.isFinite(value)) return NO_VALUE;
  const text = value.toFixed(digits);
  return Number(text) === 0 ? (0).toFixed(digits) : text;
}

type FormatOptions = { digits?: number };

function withUnit(value: number, unit: string, digits: number): string {
  const n = formatNumber(value, digits);
  return n === NO_VALUE ? NO_VALUE : `${n} ${unit}`;
}

export function formatTemperature(c: number, system: UnitSystem, opts: FormatOptions = {}): string {
  return withUnit(temperatureForDisplay(c, system), UNIT_LABELS[system].temperature, opts.digits ?? 1);
}

/** A rate of change such as "+1.5 °C/h"; the sign is always shown because direction matters. */
export function formatTemperatureRate(cPerHour: number, system: UnitSystem, opts: FormatOptions = {}): string {
  const v = system === "metric" ? cPerHour : celsiusDeltaToFahrenheit(cPerHour);
  const n = formatNumber(v, opts.digits ?? 1);
  if (n === NO_VALUE) return NO_VALUE;
  return `${Number(n) > 0 ? "+" : ""}${n} ${UNIT_LABELS[system].rate}`;
}

export function formatMass(kg: number, system: UnitSystem, opts: FormatOptions = {}): string {
  return withUnit(massForDisplay(kg, system), UNIT_LABELS[system].mass, opts.digits ?? 1);
}

export function formatVolume(litres: number, system: UnitSystem, opts: FormatOptions = {}): string {
  return withUnit(volumeForDisplay(litres, system), UNIT_LABELS[system].volume, opts.digits ?? 1);
}

export function formatLength(cm: number, system: UnitSystem, opts: FormatOptions = {}): string {
  return withUnit(lengthForDisplay(cm, system), UNIT_LABELS[system].length, opts.digits ?? 1);
}

/** Moisture content and other percentages read the same in both systems. */
export function formatPercent(pct: number, opts: FormatOptions = {}): string {
  return withUnit(pct, "%", opts.digits ?? 0);
}
