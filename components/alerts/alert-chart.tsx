"use client";

import { useMemo } from "react";
import { feedingMarks } from "@/components/charts/feeding-marks";
import { describeMetric, displayUnit, METRIC_COLORS, METRIC_TITLES, metricBand, type AmmoniaLines } from "@/components/charts/metric-words";
import { ZoneChart, type ChartMetric, type ChartMoment } from "@/components/charts/zone-chart";
import { clockFormat } from "@/components/logbook/format";
import type { Feeding } from "@/lib/client/wire";
import { getSpecies } from "@/lib/domain/species";
import type { UnitSystem } from "@/lib/domain/units";

type Props = {
  zoneId: string;
  binZones: { id: string; kind: string; name: string | null }[];
  species: string;
  metric: ChartMetric;
  ammonia: AmmoniaLines;
  system: UnitSystem;
  timezone: string;
  /** ISO window: a few hours before the raise to the settling (or now, when `to` is null). */
  from: string;
  to: string | null;
  raisedAt: string;
  settledAt: string | null;
  feedings: Feeding[];
  /** While the alert is open, "a heat alert": a value inside the band then never reads "comfortable". */
  openAlert: string | null;
};

// The zone's chart around one alert: the same chart as the zone page, over the alert's window, with
// its raise and settling drawn as lines beside the feedings.
export function AlertChart(p: Props) {
  const clock = useMemo(() => clockFormat(p.timezone), [p.timezone]);
  const marks = useMemo(() => feedingMarks(p.feedings, p.zoneId, p.binZones, p.system, clock), [p.feedings, p.zoneId, p.binZones, p.system, clock]);
  const moments = useMemo<ChartMoment[]>(
    () => [{ t: Date.parse(p.raisedAt) / 1000, label: "raised" }, ...(p.settledAt ? [{ t: Date.parse(p.settledAt) / 1000, label: "settled" }] : [])],
    [p.raisedAt, p.settledAt],
  );
  const profile = getSpecies(p.species);
  if (!profile) return <p className="p-4">This bin&apos;s species ({p.species}) has no profile, so there is no band to chart against.</p>;
  const words = p.to ? `${clock(p.from)} to ${clock(p.to)}` : `since ${clock(p.from)}`;
  return (
    <ZoneChart
      zoneId={p.zoneId}
      metric={p.metric}
      title={METRIC_TITLES[p.metric]}
      from={p.from}
      to={p.to ?? undefined}
      rangeWords={words}
      band={metricBand(p.metric, profile, p.ammonia, p.system)}
      unit={displayUnit(p.metric, p.system)}
      system={p.system}
      timezone={p.timezone}
      color={METRIC_COLORS[p.metric]}
      marks={marks}
      moments={moments}
      describe={(v) => describeMetric(p.metric, v, profile, p.ammonia, p.system, p.openAlert)}
    />
  );
}
