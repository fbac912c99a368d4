import type { AlertKind } from "./vocabulary";

export type AlertMetric = "temperature" | "moisture" | "ammonia";

/** The reading an alert is about: heat and chill are temperature, drying and soggy moisture; an
 * ammonia alert is about ammonia where a probe measured it (its details carry ppm) and otherwise the
 * temperature its estimate reads from; a probe's own alerts name their metric, or temperature. */
export function metricOfAlert(kind: AlertKind, details: Record<string, unknown>): AlertMetric {
  if (kind === "heat" || kind === "chill") return "temperature";
  if (kind === "drying" || kind === "soggy") return "moisture";
  const named = details.metric;
  if (named === "temperature" || named === "moisture" || named === "ammonia") return named;
  return kind === "ammonia" && typeof details.ppm === "number" ? "ammonia" : "temperature";
}

/** The newest value an open alert carries: the engine's latestValue when it keeps one, else the row's value. */
export function latestValueOf(a: { value: number | null; details: Record<string, unknown> }): number | null {
  return typeof a.details.latestValue === "number" ? a.details.latestValue : a.value;
}
