// Rule thresholds are stored metric; an imperial farm reads and types temperatures in °F, food in lb
// and food per bed area in lb/ft².
import {
  KG_PER_LB,
  M_PER_FOOT,
  celsiusDeltaToFahrenheit,
  celsiusToFahrenheit,
  fahrenheitDeltaToCelsius,
  fahrenheitToCelsius,
  type UnitSystem,
} from "@/lib/domain/units";

// A deadband or a sensor step is a difference of temperatures, so it converts without the 32° offset.
const isDelta = (key: string, unit: string) => unit === "°C/h" || /deadband|step/i.test(key);

export function unitLabel(unit: string, system: UnitSystem): string {
  if (system === "metric") return unit;
  return unit === "°C" ? "°F" : unit === "°C/h" ? "°F/h" : unit === "kg" ? "lb" : unit === "kg/m²" ? "lb/ft²" : unit;
}

// 1 kg/m² in lb/ft²: 0.3048² / 0.45359237 (the international yard and pound of 1959: 1 ft = 0.3048 m, 1 lb = 0.45359237 kg).
const LB_FT2_PER_KG_M2 = M_PER_FOOT ** 2 / KG_PER_LB;

/** A stored (metric) value in the farm's units, rounded for reading and typing. */
export function toShown(key: string, unit: string, value: number, system: UnitSystem): number {
  let v = value;
  if (system === "imperial" && unit.startsWith("°C")) v = isDelta(key, unit) ? celsiusDeltaToFahrenheit(value) : celsiusToFahrenheit(value);
  if (system === "imperial" && unit === "kg") v = value / KG_PER_LB;
  if (system === "imperial" && unit === "kg/m²") v = value * LB_FT2_PER_KG_M2;
  return Math.round(v * 10_000) / 10_000;
}

/** A typed value in the farm's units, back to what the API stores. */
export function fromShown(key: string, unit: string, value: number, system: UnitSystem): number {
  if (system === "metric") return value;
  if (unit === "kg") return value * KG_PER_LB;
  if (unit === "kg/m²") return value / LB_FT2_PER_KG_M2;
  if (!unit.startsWith("°C")) return value;
  return isDelta(key, unit) ? fahrenheitDeltaToCelsius(value) : fahrenheitToCelsius(value);
}
