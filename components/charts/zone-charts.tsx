"use client";

import { Fragment, useMemo, useState } from "react";
import { clockFormat } from "@/components/logbook/format";
import { SegmentedControl } from "@/components/ui/segmented-control";
import { useFeedings } from "@/lib/client/hooks/use-feedings";
import { getSpecies } from "@/lib/domain/species";
import { AMMONIA_CHART_CAUTION } from "@/lib/domain/alert-words";
import type { UnitSystem } from "@/lib/domain/units";
import { CHART_RANGES, rangeStart, type ChartRange } from "./chart-kit";
import { feedingMarks } from "./feeding-marks";
import { describeMetric, displayUnit, METRIC_COLORS, METRIC_TITLES, metricBand, type AmmoniaLines } from "./metric-words";
import { ZoneChart, type ChartHeading, type ChartMetric, type ChartReading } from "./zone-chart";

type Props = {
  zoneId: string;
  binId: string;
  binZones: { id: string; kind: string; name: string | null }[];
  species: string;
  metrics: ChartMetric[];
  ammonia: AmmoniaLines;
  system: UnitSystem;
  timezone: string;
  /** Per metric, the open alert on it in words ("a heat alert"), so its values never read "comfortable". */
  openAlerts?: Partial<Record<ChartMetric, string>>;
  /** The zone's newest reading of each metric, as the page read it. */
  latest?: Partial<Record<ChartMetric, ChartReading>>;
  /** Where temperature and moisture are heading (lib/server/zones/zone-heading-view.ts). */
  heading?: Partial<Record<"temperature" | "moisture", ChartHeading>>;
};

// The zone's charts over one shared window, with the bin's feedings (this zone's and whole-bin ones) as marks.
export function ZoneCharts(p: Props) {
  const [range, setRange] = useState<ChartRange>("24h");
  // The start is fixed when the window is chosen (to the minute), so the SWR key stays put; 24 h asks
  // the server's default, which the page primed.
  const [from, setFrom] = useState<string | undefined>(undefined);
  const choose = (r: ChartRange) => {
    setRange(r);
    setFrom(rangeStart(r));
  };
  const profile = getSpecies(p.species);
  const { data: fed } = useFeedings(p.binId);
  const clock = useMemo(() => clockFormat(p.timezone), [p.timezone]);

  const marks = useMemo(() => feedingMarks(fed?.feedings ?? [], p.zoneId, p.binZones, p.system, clock), [fed, p.zoneId, p.binZones, p.system, clock]);

  if (!profile) return <p className="p-4">This bin&apos;s species ({p.species}) has no profile, so there is no band to chart against.</p>;
  const r = CHART_RANGES.find((x) => x.value === range)!;
  return (
    <section aria-labelledby="charts-h" className="space-y-3">
      <div className="flex items-baseline justify-between">
        <h2 id="charts-h" className="text-xl font-bold">
          Charts
        </h2>
        <span className="text-sm text-soil-700">{r.words}</span>
      </div>
      <SegmentedControl label="Chart window" options={CHART_RANGES} value={range} onChange={choose} />
      {p.metrics.map((m) => (
        <Fragment key={m}>
          <ZoneChart
            zoneId={p.zoneId}
            metric={m}
            title={METRIC_TITLES[m]}
            from={from}
            latest={p.latest?.[m] ?? null}
            rangeWords={r.words}
            band={metricBand(m, profile, p.ammonia, p.system)}
            unit={displayUnit(m, p.system)}
            system={p.system}
            timezone={p.timezone}
            color={METRIC_COLORS[m]}
            marks={marks}
            binZones={p.binZones}
            heading={m === "ammonia" ? null : (p.heading?.[m] ?? null)}
            describe={(v) => describeMetric(m, v, profile, p.ammonia, p.system, p.openAlerts?.[m])}
          />
          {/* The ammonia chart carries the same caution as an ammonia alert. */}
          {m === "ammonia" && <p className="text-sm font-bold">{AMMONIA_CHART_CAUTION}</p>}
        </Fragment>
      ))}
    </section>
  );
}
