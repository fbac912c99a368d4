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

// Inside the band but with an open alert on the metric, a value reads as the alert's side, never "comfortable".
const ALERT_SIDE: Partial<Record<AlertKind, string>> = { heat: "warm", chill: "cool", drying: "dry", soggy: "wet" };

/** A value's band as shown beside a zone's open alerts: "comfortable" gives way to the open alert's side. */
export function bandBeside(
  band: string | null,
  openAlerts: readonly { kind: AlertKind; details: Record<string, unknown> }[],
  metric: "temperature" | "moisture",
): string | null {
  if (band !== "comfortable") return band;
  const on = openAlerts.find((a) => metricOfAlert(a.kind, a.details) === metric && ALERT_SIDE[a.kind]);
  return on ? ALERT_SIDE[on.kind]! : band;
}
