"use client";

import { useEffect, useMemo, useRef, useState } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { clockFormat, zoneWords } from "@/components/logbook/format";
import { SegmentedControl } from "@/components/ui/segmented-control";
import { useBinSeries } from "@/lib/client/hooks/use-bin-series";
import { getSpecies } from "@/lib/domain/species";
import { formatNumber, temperatureForDisplay } from "@/lib/domain/units";
import {
  bindTouch,
  keepCursor,
  type HeldCursor,
  CHART_RANGES,
  cursorWhen,
  drawMarks,
  eventMarks,
  levelWords,
  marksNear,
  marksWords,
  rangeStart,
  tablesOf,
  timeLabels,
  type ChartRange,
} from "./chart-kit";
import { CursorLegend, MarkButtons, NO_READING, type CursorWords } from "./cursor-legend";
import { displayUnit, metricBand } from "./metric-words";
import { paletteColor, useColorScheme, withAlpha } from "./theme-colors";

type BinMetric = "temperature" | "moisture";
type Props = {
  farmId: string;
  binId: string;
  zones: { id: string; kind: string; name: string | null }[];
  system: "metric" | "imperial";
  timezone: string;
};

const METRIC_CHOICES = [
  { value: "temperature", label: "Temperature" },
  { value: "moisture", label: "Moisture" },
] as const;

// Each zone's line has its own dash as well as its own colour, so zones are told apart without
// colour; the legend shows each line's sample beside the zone's name. From the feeding side.
// `sample` draws the same dash in CSS for the legend (Tailwind needs whole class names, so each is spelled out).
const LINE_STYLES: { color: string; sample: string; dash: number[] | undefined; dashWords: string }[] = [
  { color: "--color-clay-700", sample: "bg-clay-700", dash: undefined, dashWords: "solid" },
  {
    color: "--color-leaf-700",
    sample: "bg-[repeating-linear-gradient(90deg,var(--color-leaf-700)_0_8px,transparent_8px_12px)]",
    dash: [8, 4],
    dashWords: "dashed",
  },
  {
    color: "--color-slate-700",
    sample: "bg-[repeating-linear-gradient(90deg,var(--color-slate-700)_0_2px,transparent_2px_5px)]",
    dash: [2, 3],
    dashWords: "dotted",
  },
  {
    color: "--color-straw-800",
    sample: "bg-[repeating-linear-gradient(90deg,var(--color-straw-800)_0_10px,transparent_10px_13px,var(--color-straw-800)_13px_15px,transparent_15px_18px)]",
    dash: [10, 3, 2, 3],
    dashWords: "dash-dot",
  },
  {
    color: "--color-soil-700",
    sample: "bg-[repeating-linear-gradient(90deg,var(--color-soil-700)_0_4px,transparent_4px_8px)]",
    dash: [4, 4],
    dashWords: "short dashes",
  },
  {
    color: "--color-soil-500",
    sample: "bg-[repeating-linear-gradient(90deg,var(--color-soil-500)_0_12px,transparent_12px_18px)]",
    dash: [12, 6],
    dashWords: "long dashes",
  },
];
const styleOf = (k: number) => LINE_STYLES[k % LINE_STYLES.length]!;
// Only the band's words are read for these two metrics; the ammonia lines are never drawn here.
const NO_AMMONIA = { headsUpAtPpm: 0, actNowAtPpm: 0 };
const HEIGHT = 230;
const MAX_MARK_BUTTONS = 24;

/** A short sample of a zone's line, for the legend. */
function Swatch({ k }: { k: number }) {
  const s = styleOf(k);
  return <span aria-hidden="true" className={`inline-block h-[3px] w-7 shrink-0 self-center ${s.sample}`} />;
}

type Geom = { left: number; top: number; width: number; height: number; xMin: number; xMax: number };

// Every zone of one bin on one chart, for one metric and range: one line per zone (its probes
// merged), the species' band shaded behind, the bin's logbook entries as marks, and a cursor that
// reads every zone at one time in a large legend above the plot.
export function BinChart(p: Props) {
  const [metric, setMetric] = useState<BinMetric>("temperature");
  const [range, setRange] = useState<ChartRange>("24h");
  const [from, setFrom] = useState<string | undefined>(undefined);
  const { data, error, isLoading } = useBinSeries(p.binId, { metric, from });
  const box = useRef<HTMLDivElement>(null);
  const [geom, setGeom] = useState<Geom | null>(null);
  const [cursor, setCursor] = useState<CursorWords | null>(null);
  const held = useRef<HeldCursor>(null);
  const [picked, setPicked] = useState<string | null>(null);
  const scheme = useColorScheme();

  const clock = useMemo(() => clockFormat(p.timezone), [p.timezone]);
  const when = useMemo(() => cursorWhen(p.timezone), [p.timezone]);
  const conv = useMemo(() => (metric === "temperature" ? (v: number) => temperatureForDisplay(v, p.system) : (v: number) => v), [metric, p.system]);
  const unit = displayUnit(metric, p.system);
  const species = data?.species;
  const band = useMemo(() => {
    const profile = species ? getSpecies(species) : null;
    return profile ? metricBand(metric, profile, NO_AMMONIA, p.system) : null;
  }, [species, metric, p.system]);
  const xMin = data ? Date.parse(data.from) / 1000 : 0;
  const xMax = data ? Date.parse(data.to) / 1000 : 1;
  // The bin's zones in the answer's order (from the feeding side), named as the page names them.
  const zoneLines = useMemo(
    () =>
      (data?.zones ?? []).map((z, k) => {
        const given = p.zones.find((g) => g.id === z.zoneId);
        return { ...z, k, words: zoneWords(given ?? z) };
      }),
    [data, p.zones],
  );
  const drawn = useMemo(() => (data ? tablesOf(zoneLines, data.bucketSeconds, conv, false, xMin, xMax) : null), [data, zoneLines, conv, xMin, xMax]);
  const marks = useMemo(
    () => eventMarks(data?.events ?? [], p.zones, p.system, clock).filter((m) => m.t >= xMin && m.t <= xMax),
    [data, p.zones, p.system, clock, xMin, xMax],
  );
  const points = zoneLines.reduce((n, z) => n + z.t.length, 0);

  useEffect(() => {
    const el = box.current;
    if (!el || !data || !drawn || drawn.tables.length === 0) return;
    const aligned = drawn.tables.length === 1 ? drawn.tables[0]! : uPlot.join(drawn.tables);
    const keep = keepCursor(held);
    const dark = scheme === "dark";
    const ink = paletteColor("--color-soil-800");
    const bandFill = withAlpha(paletteColor("--color-leaf-500"), dark ? 0.24 : 0.18);
    const series: uPlot.Series[] = [{}];
    for (const z of drawn.lines) {
      const s = styleOf(z.k);
      series.push({ label: z.words, stroke: paletteColor(s.color), width: 2, dash: s.dash, points: { show: false } });
    }
    let lo = band ? band.low : Infinity;
    let hi = band ? band.high : -Infinity;
    for (const t of drawn.tables)
      for (const v of t[1]!) {
        if (v == null) continue;
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
    const pad = (hi - lo) * 0.08 || 1;
    const font = `13px ${getComputedStyle(el).fontFamily}`;
    const axis = {
      stroke: paletteColor("--color-soil-700"),
      font,
      grid: { stroke: paletteColor("--color-soil-100"), width: 1 },
      ticks: { stroke: paletteColor("--color-soil-300"), width: 1 },
    };
    const measure = (u: uPlot) => {
      const r = uPlot.pxRatio;
      setGeom({ left: u.bbox.left / r, top: u.bbox.top / r, width: u.bbox.width / r, height: u.bbox.height / r, xMin, xMax });
    };
    const opts: uPlot.Options = {
      width: el.clientWidth || 340,
      height: HEIGHT,
      legend: { show: false },
      cursor: { drag: { x: false, y: false }, points: { size: 8 } },
      select: { show: false, left: 0, top: 0, width: 0, height: 0 },
      tzDate: (ts) => uPlot.tzDate(new Date(ts * 1000), p.timezone),
      scales: { x: { time: true, range: [xMin, xMax] }, y: { range: [Math.max(metric === "temperature" ? -Infinity : 0, lo - pad), hi + pad] } },
      axes: [
        { ...axis, space: 64, values: timeLabels(p.timezone) },
        {
          ...axis,
          size: 44,
          incrs: [0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500],
          values: (_u, splits, _i, _s, incr) => splits.map((v) => formatNumber(v, incr < 1 ? 1 : 0)),
        },
      ],
      series,
      hooks: {
        drawClear: [
          (u) => {
            if (band) {
              const top = u.valToPos(band.high, "y", true);
              const bottom = u.valToPos(band.low, "y", true);
              u.ctx.save();
              u.ctx.fillStyle = bandFill;
              u.ctx.fillRect(u.bbox.left, top, u.bbox.width, bottom - top);
              u.ctx.restore();
            }
            drawMarks(u, marks, ink);
          },
        ],
        ready: [measure, keep.ready],
        setSize: [measure],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            const t = i == null ? undefined : u.data[0][i];
            if (!keep.follow(u, t)) return;
            if (t == null) {
              setCursor(null);
              return;
            }
            const rows = drawn.lines.map((z, k) => {
              const v = u.data[1 + k]?.[i!];
              return { name: z.words, swatch: <Swatch k={z.k} />, value: v == null ? NO_READING : `${formatNumber(v, 1)} ${unit}`, range: null };
            });
            setCursor({ when: when(drawn.starts.get(t) ?? t, data.bucketSeconds), rows, near: marksNear(u, marks, u.cursor.left ?? -1) });
            setPicked(null);
          },
        ],
      },
    };
    const plot = new uPlot(opts, aligned, el);
    const unbind = bindTouch(plot);
    const ro = new ResizeObserver(() => {
      if (el.clientWidth && el.clientWidth !== plot.width) plot.setSize({ width: el.clientWidth, height: HEIGHT });
    });
    ro.observe(el);
    return () => {
      ro.disconnect();
      unbind();
      plot.destroy();
    };
  }, [data, drawn, band, marks, metric, unit, when, xMin, xMax, p.timezone, scheme]);

  const rangeWords = CHART_RANGES.find((r) => r.value === range)!.words;
  const title = metric === "temperature" ? "Temperature" : "Moisture";
  const pickedMark = marks.find((m) => m.id === picked) ?? null;
  const newest = zoneLines.map((z) => ({
    name: z.words,
    swatch: <Swatch k={z.k} />,
    value: z.t.length ? `${formatNumber(conv(z.mean[z.mean.length - 1]!), 1)} ${unit}` : NO_READING,
  }));
  const label = data
    ? `${title} of every zone, ${rangeWords}: ${zoneLines
        .map(
          (z) =>
            `${z.words} ${styleOf(z.k).dashWords} line${z.t.length ? `, newest ${formatNumber(conv(z.mean[z.mean.length - 1]!), 1)} ${unit}` : ", no readings"}`,
        )
        .join("; ")}${band ? `; ${band.words} shaded` : ""}; ${marksWords(marks)}.`
    : "";

  return (
    <figure className="space-y-2 rounded-2xl bg-white p-3 ring-1 ring-soil-300" data-bin-chart={p.binId}>
      <figcaption className="flex items-baseline justify-between gap-2">
        <h3 className="text-lg font-bold">{title} of every zone</h3>
        <span className="tabular text-sm text-soil-700">{data ? levelWords(data.bucketSeconds) : ""}</span>
      </figcaption>
      <SegmentedControl label="Metric for all zones" options={METRIC_CHOICES} value={metric} onChange={setMetric} />
      <SegmentedControl
        label="Window for all zones"
        options={CHART_RANGES}
        value={range}
        onChange={(r) => {
          setRange(r);
          setFrom(rangeStart(r));
        }}
      />
      <CursorLegend
        cursor={cursor}
        minHeight="min-h-[9.5rem]"
        idle={
          pickedMark ? (
            <span className="block text-lg">{pickedMark.detail}</span>
          ) : (
            <>
              <span className="block text-base font-bold text-soil-800">Newest · touch the chart to read a time</span>
              {newest.map((r) => (
                <span key={r.name} className="flex flex-wrap items-baseline gap-x-2">
                  {r.swatch}
                  <span className="text-base">{r.name}</span>
                  <span className="text-xl font-bold">{r.value}</span>
                </span>
              ))}
            </>
          )
        }
      />
      {!data ? (
        <p className="flex h-52 items-center text-soil-700">{error ? error.message : isLoading ? "Loading readings…" : "No readings."}</p>
      ) : points === 0 ? (
        <p className="flex h-24 items-center text-soil-700">No readings in the {rangeWords}.</p>
      ) : (
        <div className="relative">
          <div
            ref={box}
            role="img"
            aria-label={label}
            className="w-full"
            data-source={data.source}
            data-bucket-seconds={data.bucketSeconds ?? undefined}
            data-points={points}
            data-lines={drawn?.lines.length ?? 0}
            data-marks={marks.length}
          />
          {geom && marks.length > 0 && marks.length <= MAX_MARK_BUTTONS && (
            <MarkButtons
              marks={marks}
              title={`bin ${title}`}
              picked={picked}
              onPick={setPicked}
              x={(t) => geom.left + ((t - geom.xMin) / (geom.xMax - geom.xMin)) * geom.width}
              top={geom.top + geom.height - 30}
            />
          )}
        </div>
      )}
      {band && (
        <p className="flex flex-wrap items-center gap-x-3 gap-y-1 text-xs text-soil-700">
          <span className="inline-flex items-center gap-1">
            <span aria-hidden="true" className="inline-block h-3 w-4 rounded-sm bg-leaf-500/20 outline outline-1 outline-leaf-500/50" />
            {band.words}
          </span>
        </p>
      )}
    </figure>
  );
}
