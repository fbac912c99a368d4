// Rule thresholds are stored metric; an imperial farm reads and types temperatures in °F.
import { celsiusDeltaToFahrenheit, celsiusToFahrenheit, fahrenheitDeltaToCelsius, fahrenheitToCelsius, type UnitSystem } from "@/lib/domain/units";

// A deadband or a sensor step is a difference of temperatures, so it converts without the 32° offset.
const isDelta = (key: string, unit: string) => unit === "°C/h" || /deadband|step/i.test(key);

export function unitLabel(unit: string, system: UnitSystem): string {
  if (system === "metric") return unit;
  return unit === "°C" ? "°F" : unit === "°C/h" ? "°F/h" : unit;
}

/** A stored (metric) value in the farm's units, rounded for reading and typing. */
export function toShown(key: string, unit: string, value: number, system: UnitSystem): number {
  let v = value;
  if (system === "imperial" && unit.startsWith("°C")) v = isDelta(key, unit) ? celsiusDeltaToFahrenheit(value) : celsiusToFahrenheit(value);
  return Math.round(v * 10_000) / 10_000;
}

/** A typed value in the farm's units, back to what the API stores. */
export function fromShown(key: string, unit: string, value: number, system: UnitSystem): number {
  if (system === "metric" || !unit.startsWith("°C")) return value;
  return isDelta(key, unit) ? fahrenheitDeltaToCelsius(value) : fahrenheitToCelsius(value);
}
