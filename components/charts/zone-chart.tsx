"use client";

import { useEffect, useMemo, useRef, useState } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import type { Series } from "@/lib/client/wire";
import { clockFormat } from "@/components/logbook/format";
import { useSeries } from "@/lib/client/hooks/use-series";
import { formatNumber, temperatureForDisplay, type UnitSystem } from "@/lib/domain/units";
import { Mark } from "@/components/ui/marks";
import { paletteColor, useColorScheme, withAlpha } from "./theme-colors";

export type ChartMetric = "temperature" | "moisture" | "ammonia";
/** A feeding drawn on the time axis; t in Unix seconds. */
export type ChartMark = { id: string; t: number; label: string; detail: string };
/** A moment of an alert (raised, settled) drawn as a solid line with its word; t in Unix seconds. */
export type ChartMoment = { t: number; label: string };
/** A reading as stored: ISO time and value in stored units. */
export type ChartReading = { ts: string; value: number };

type Props = {
  zoneId: string;
  metric: ChartMetric;
  title: string;
  /** ISO start of the window; none = the server's default, the last 24 h. */
  from?: string;
  /** ISO end of a window in the past; none = now, kept fresh. */
  to?: string;
  /** The zone's newest reading as the page read it: "latest" is this reading (or a newer one the
   * chart has since fetched), never a bucket's mean. */
  latest?: ChartReading | null;
  moments?: readonly ChartMoment[];
  rangeWords: string;
  /** Shaded range in display units, and how to say it ("comfortable 15–25 °C"). */
  band: { low: number; high: number; words: string };
  unit: string;
  system: UnitSystem;
  timezone: string;
  /** The line's colour: a palette variable ("--color-clay-500"), so the chart follows the theme. */
  color: string;
  marks: readonly ChartMark[];
  /** A stored value in words ("23.4 °C, comfortable"). */
  describe: (stored: number) => string;
  /** Where the readings are heading (the rules' own rate or trend, per hour in stored units): drawn
   * as a dashed line on from the latest reading, into a short stretch of the time axis after now. */
  heading?: ChartHeading | null;
};

export type ChartHeading = { ratePerHour: number | null; crossingAt: number | null; words: string };

/** How far past now the axis runs when a heading is drawn: an eighth of the window. */
const AHEAD_SHARE = 0.125;

type Geom = { left: number; top: number; width: number; height: number; xMin: number; xMax: number; bandTop: number; bandBottom: number };

const HEIGHT = 210;
const RECENT_MS = 3 * 3_600_000;

function medianStep(t: readonly number[]): number {
  if (t.length < 2) return 60;
  const d = t
    .slice(1)
    .map((x, i) => x - t[i]!)
    .sort((a, b) => a - b);
  return d[Math.floor(d.length / 2)]!;
}

// One table per probe: mean (and min/max when points are aggregates), with an explicit null where
// readings stop for more than three steps, so a silent probe shows as a gap rather than a ramp.
function tablesOf(ans: Series, conv: (v: number) => number, aggregated: boolean): uPlot.AlignedData[] {
  return ans.series
    .filter((s) => s.t.length > 0)
    .map((s) => {
      const step = ans.bucketSeconds ?? medianStep(s.t);
      const t: number[] = [];
      const cols: (number | null)[][] = aggregated ? [[], [], []] : [[]];
      s.t.forEach((x, i) => {
        if (i > 0 && x - s.t[i - 1]! > 3 * step) {
          t.push(s.t[i - 1]! + step);
          cols.forEach((c) => c.push(null));
        }
        t.push(x);
        cols[0]!.push(conv(s.mean[i]!));
        if (aggregated) {
          cols[1]!.push(conv(s.min[i]!));
          cols[2]!.push(conv(s.max[i]!));
        }
      });
      return [t, ...cols] as uPlot.AlignedData;
    });
}

function safeFormat(timeZone: string, opts: Intl.DateTimeFormatOptions) {
  try {
    return new Intl.DateTimeFormat("en-GB", { ...opts, timeZone });
  } catch {
    return new Intl.DateTimeFormat("en-GB", { ...opts, timeZone: "UTC" });
  }
}

// Time-axis labels in the farm's zone: 24-hour clock, and the day ("2 Dec") at midnight or when
// ticks are a day or more apart.
function timeLabels(timeZone: string) {
  const hm = safeFormat(timeZone, { hour: "2-digit", minute: "2-digit", hourCycle: "h23" });
  const dm = safeFormat(timeZone, { day: "numeric", month: "short" });
  return (_u: uPlot, splits: number[], _i: number, _s: number, incr: number) =>
    splits.map((t) => {
      const d = new Date(t * 1000);
      const time = hm.format(d);
      return incr >= 86_400 || time === "00:00" ? dm.format(d) : time;
    });
}

// One metric of a zone over a window: mean line, min–max band when points are aggregates, the
// species' band shaded behind, and feedings as marks on the time axis (tap or hover for details).
export function ZoneChart(p: Props) {
  const { data, error, isLoading } = useSeries({ zoneId: p.zoneId }, { metric: p.metric, from: p.from, to: p.to });
  const box = useRef<HTMLDivElement>(null);
  const [geom, setGeom] = useState<Geom | null>(null);
  const [readout, setReadout] = useState<string | null>(null);
  const [picked, setPicked] = useState<string | null>(null);
  const scheme = useColorScheme();

  const clock = useMemo(() => clockFormat(p.timezone), [p.timezone]);
  const conv = useMemo(() => (p.metric === "temperature" ? (v: number) => temperatureForDisplay(v, p.system) : (v: number) => v), [p.metric, p.system]);
  const aggregated = data?.bucketSeconds != null;
  const tables = useMemo(() => (data ? tablesOf(data, conv, aggregated) : []), [data, conv, aggregated]);
  const xMin = data ? Date.parse(data.from) / 1000 : 0;
  const xMax = data ? Date.parse(data.to) / 1000 : 1;
  const marks = useMemo(() => p.marks.filter((m) => m.t >= xMin && m.t <= xMax), [p.marks, xMin, xMax]);
  // A heading is drawn only on a window that ends now, and only with a rate to draw.
  const rate = !p.to && p.heading?.ratePerHour != null && Number.isFinite(p.heading.ratePerHour) ? p.heading.ratePerHour : null;
  const xEnd = rate === null ? xMax : xMax + (xMax - xMin) * AHEAD_SHARE;

  const summary = useMemo(() => {
    if (!data) return null;
    let last: { t: number; v: number } | null = null;
    let lo = Infinity;
    let hi = -Infinity;
    for (const s of data.series) {
      const n = s.t.length;
      if (n && (!last || s.t[n - 1]! > last.t)) last = { t: s.t[n - 1]!, v: s.mean[n - 1]! };
      for (const v of aggregated ? s.min : s.mean) lo = Math.min(lo, v);
      for (const v of aggregated ? s.max : s.mean) hi = Math.max(hi, v);
    }
    return last ? { last, lo, hi } : null;
  }, [data, aggregated]);

  // Where the window's points are means (7 and 30 days, or a busy 24 h), the newest single reading
  // comes from the page's own read and a short raw window fetched beside it, so "latest" is a
  // reading at every window. The short window's start is fixed once, so its key stays put.
  const [recentFrom] = useState(() => new Date(Math.floor(Date.now() / 60_000) * 60_000 - RECENT_MS).toISOString());
  const { data: recent } = useSeries(!p.to && aggregated ? { zoneId: p.zoneId } : null, { metric: p.metric, from: recentFrom });
  const latest = useMemo(() => {
    if (p.to) return summary?.last ?? null;
    const found: { t: number; v: number }[] = [];
    if (summary && !aggregated) found.push(summary.last);
    if (p.latest) found.push({ t: Date.parse(p.latest.ts) / 1000, v: p.latest.value });
    if (recent && recent.bucketSeconds == null)
      for (const s of recent.series) if (s.t.length) found.push({ t: s.t[s.t.length - 1]!, v: s.mean[s.mean.length - 1]! });
    return found.reduce<{ t: number; v: number } | null>((a, b) => (!a || b.t > a.t ? b : a), null);
  }, [p.to, p.latest, summary, aggregated, recent]);
  const moments = useMemo(() => (p.moments ?? []).filter((m) => m.t >= xMin && m.t <= xMax), [p.moments, xMin, xMax]);
  // The heading's line: from the latest reading along the rate, to the axis' end or, when the trend
  // crosses the band's edge sooner, to that crossing (stored units; t in Unix seconds).
  const crossingAt = p.heading?.crossingAt ?? null;
  const ahead = useMemo(() => {
    if (rate === null || !latest) return null;
    const crossing = crossingAt !== null ? crossingAt / 1000 : null;
    const t1 = crossing !== null && crossing > latest.t && crossing < xEnd ? crossing : xEnd;
    return { t0: latest.t, v0: latest.v, t1, v1: latest.v + (rate * (t1 - latest.t)) / 3600 };
  }, [rate, latest, crossingAt, xEnd]);

  useEffect(() => {
    const el = box.current;
    if (!el || !data || tables.length === 0 || !summary) return;
    const aligned = tables.length === 1 ? tables[0]! : uPlot.join(tables);
    const per = aggregated ? 3 : 1;
    // Colours from the palette as it is now (light or dark).
    const dark = scheme === "dark";
    const line = paletteColor(p.color);
    const bandFill = withAlpha(paletteColor("--color-leaf-500"), dark ? 0.24 : 0.18);
    const ink = paletteColor("--color-soil-800");
    const series: uPlot.Series[] = [{}];
    const bands: uPlot.Band[] = [];
    tables.forEach((_, k) => {
      series.push({ label: data.series[k]?.label ?? `probe ${k + 1}`, stroke: line, width: 2, dash: k ? [6, 4] : undefined, points: { show: false } });
      if (aggregated) {
        series.push({ stroke: "transparent", width: 0, points: { show: false } }, { stroke: "transparent", width: 0, points: { show: false } });
        bands.push({ series: [3 + k * per, 2 + k * per], fill: withAlpha(line, dark ? 0.26 : 0.18) });
      }
    });
    const lo = Math.min(p.band.low, conv(summary.lo), ahead ? conv(ahead.v1) : Infinity);
    const hi = Math.max(p.band.high, conv(summary.hi), ahead ? conv(ahead.v1) : -Infinity);
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
      setGeom({
        left: u.bbox.left / r,
        top: u.bbox.top / r,
        width: u.bbox.width / r,
        height: u.bbox.height / r,
        xMin,
        xMax: xEnd,
        bandTop: u.bbox.top / r + u.valToPos(p.band.high, "y"),
        bandBottom: u.bbox.top / r + u.valToPos(p.band.low, "y"),
      });
    };
    const opts: uPlot.Options = {
      width: el.clientWidth || 340,
      height: HEIGHT,
      legend: { show: false },
      cursor: { drag: { x: false, y: false }, points: { size: 8 } },
      select: { show: false, left: 0, top: 0, width: 0, height: 0 },
      tzDate: (ts) => uPlot.tzDate(new Date(ts * 1000), p.timezone),
      scales: { x: { time: true, range: [xMin, xEnd] }, y: { range: [Math.max(p.metric === "temperature" ? -Infinity : 0, lo - pad), hi + pad] } },
      axes: [
        { ...axis, space: 64, values: timeLabels(p.timezone) },
        // 1-2-5 steps only, so whole-number ticks never have to print 22.5 as "23"
        {
          ...axis,
          size: 44,
          incrs: [0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50, 100, 200, 500],
          values: (_u, splits, _i, _s, incr) => splits.map((v) => formatNumber(v, incr < 1 ? 1 : 0)),
        },
      ],
      series,
      bands,
      hooks: {
        drawClear: [
          (u) => {
            const ctx = u.ctx;
            ctx.save();
            const top = u.valToPos(p.band.high, "y", true);
            const bottom = u.valToPos(p.band.low, "y", true);
            ctx.fillStyle = bandFill;
            ctx.fillRect(u.bbox.left, top, u.bbox.width, bottom - top);
            // Feedings: a dashed line through the plot under a small square (a scrap, as in the
            // feeding mark) on the plot's top edge; the cursor's point is a round dot, so the two
            // never mix. The tappable mark sits on the time axis.
            const r = uPlot.pxRatio;
            ctx.strokeStyle = withAlpha(ink, 0.55);
            ctx.fillStyle = ink;
            ctx.lineWidth = r;
            for (const m of marks) {
              const x = Math.round(u.valToPos(m.t, "x", true)) + 0.5;
              ctx.setLineDash([4 * r, 4 * r]);
              ctx.beginPath();
              ctx.moveTo(x, u.bbox.top + 7 * r);
              ctx.lineTo(x, u.bbox.top + u.bbox.height);
              ctx.stroke();
              ctx.setLineDash([]);
              ctx.fillRect(x - 3.5 * r, u.bbox.top, 7 * r, 7 * r);
            }
            // An alert's moments: a solid line, its word beside it at the top.
            ctx.strokeStyle = ink;
            ctx.lineWidth = 2 * r;
            ctx.font = `bold ${12 * r}px ${getComputedStyle(el).fontFamily}`;
            // Two moments close together put their words on separate rows.
            let lastRight = -Infinity;
            let row = 0;
            for (const m of moments) {
              const x = Math.round(u.valToPos(m.t, "x", true));
              ctx.beginPath();
              ctx.moveTo(x, u.bbox.top);
              ctx.lineTo(x, u.bbox.top + u.bbox.height);
              ctx.stroke();
              const w = ctx.measureText(m.label).width;
              const right = x + 4 * r + w <= u.bbox.left + u.bbox.width;
              const left = right ? x + 4 * r : x - 4 * r - w;
              row = left < lastRight + 4 * r ? row + 1 : 0;
              lastRight = left + w;
              ctx.fillText(m.label, left, u.bbox.top + (22 + 16 * row) * r);
            }
            // Where it is heading: a dashed line on from the latest reading, kept inside the plot.
            if (ahead) {
              ctx.save();
              ctx.beginPath();
              ctx.rect(u.bbox.left, u.bbox.top, u.bbox.width, u.bbox.height);
              ctx.clip();
              ctx.strokeStyle = line;
              ctx.lineWidth = 2 * r;
              ctx.setLineDash([3 * r, 3 * r]);
              ctx.beginPath();
              ctx.moveTo(u.valToPos(ahead.t0, "x", true), u.valToPos(conv(ahead.v0), "y", true));
              ctx.lineTo(u.valToPos(ahead.t1, "x", true), u.valToPos(conv(ahead.v1), "y", true));
              ctx.stroke();
              ctx.restore();
            }
            ctx.restore();
          },
        ],
        ready: [measure],
        setSize: [measure],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            const t = i == null ? undefined : u.data[0][i];
            const v = i == null ? undefined : u.data[1]?.[i];
            setReadout(t == null || v == null ? null : `${clock(t * 1000)} · ${formatNumber(v, 1)} ${p.unit}`);
            // Moving along the line hands the readout back from a picked feeding to the cursor.
            if (t != null) setPicked(null);
          },
        ],
      },
    };
    const plot = new uPlot(opts, aligned, el);
    const ro = new ResizeObserver(() => {
      if (el.clientWidth && el.clientWidth !== plot.width) plot.setSize({ width: el.clientWidth, height: HEIGHT });
    });
    ro.observe(el);
    return () => {
      ro.disconnect();
      plot.destroy();
    };
  }, [
    data,
    tables,
    summary,
    aggregated,
    conv,
    clock,
    marks,
    moments,
    ahead,
    xMin,
    xMax,
    xEnd,
    p.band.low,
    p.band.high,
    p.color,
    p.metric,
    p.timezone,
    p.unit,
    scheme,
  ]);

  const pickedMark = marks.find((m) => m.id === picked) ?? null;
  const latestWords = latest ? `${p.to ? "last in this window" : "latest"} ${p.describe(latest.v)} at ${clock(latest.t * 1000)}` : "";
  const label = summary
    ? `${p.title}, ${p.rangeWords}: ${latestWords}; lowest ${formatNumber(conv(summary.lo), 1)}, highest ${formatNumber(conv(summary.hi), 1)} ${p.unit}; ${p.band.words} shaded; ${marks.length === 1 ? "1 feeding" : `${marks.length} feedings`} marked${moments.map((m) => `; ${m.label} at ${clock(m.t * 1000)}`).join("")}${ahead && p.heading ? `; dashed on from the latest reading: ${p.heading.words}` : ""}.`
    : `${p.title}, ${p.rangeWords}: no readings.`;

  return (
    <figure className="rounded-2xl bg-white p-3 ring-1 ring-soil-300" data-metric={p.metric}>
      <figcaption className="flex items-baseline justify-between gap-2">
        <h3 className="text-lg font-bold">{p.title}</h3>
        <span className="tabular text-sm text-soil-700">
          {data?.source === "rollup"
            ? "hourly means, low–high shaded"
            : aggregated
              ? `${Math.round(data!.bucketSeconds! / 60)}-min means, low–high shaded`
              : "every reading"}
        </span>
      </figcaption>
      {!data ? (
        <p className="flex h-52 items-center text-soil-700">{error ? error.message : isLoading ? "Loading readings…" : "No readings."}</p>
      ) : !summary ? (
        <p className="flex h-24 items-center text-soil-700">No readings in the {p.rangeWords}.</p>
      ) : (
        <div className="relative mt-1">
          <div
            ref={box}
            role="img"
            aria-label={label}
            className="zone-chart w-full"
            data-band-low={p.band.low}
            data-band-high={p.band.high}
            data-band-top={geom?.bandTop}
            data-band-bottom={geom?.bandBottom}
            data-plot-left={geom?.left}
            data-plot-width={geom?.width}
            data-plot-top={geom?.top}
            data-plot-height={geom?.height}
            data-heading-to={ahead ? Math.round(ahead.t1) : undefined}
          />
          {geom && marks.length > 0 && (
            <ul aria-label={`Feedings on the ${p.title.toLowerCase()} chart`} className="pointer-events-none absolute inset-0">
              {marks.map((m) => {
                const x = geom.left + ((m.t - geom.xMin) / (geom.xMax - geom.xMin)) * geom.width;
                const on = m.id === picked;
                return (
                  <li key={m.id} className="absolute" style={{ left: x - 22, top: geom.top + geom.height - 30 }}>
                    <button
                      type="button"
                      aria-label={m.label}
                      aria-pressed={on}
                      onClick={() => setPicked(m.id)}
                      onMouseEnter={() => setPicked(m.id)}
                      onFocus={() => setPicked(m.id)}
                      className="pointer-events-auto flex h-11 w-11 items-end justify-center pb-1"
                    >
                      <span className={`rounded-md p-0.5 ring-1 ring-soil-800 ${on ? "bg-soil-800 text-white" : "bg-white text-soil-800"}`}>
                        <Mark name="feeding" size={16} />
                      </span>
                    </button>
                  </li>
                );
              })}
            </ul>
          )}
        </div>
      )}
      <p aria-live="polite" className="tabular mt-1 min-h-6 text-sm text-soil-800">
        {pickedMark ? pickedMark.detail : (readout ?? (latestWords ? latestWords.replace(/^./, (c) => c.toUpperCase()) : ""))}
      </p>
      <p className="mt-1 flex items-center gap-3 text-xs text-soil-700">
        <span className="inline-flex items-center gap-1">
          {/* Classes, not style=: the content security policy refuses style attributes in HTML. */}
          <span aria-hidden="true" className="inline-block h-3 w-4 rounded-sm bg-leaf-500/20 outline outline-1 outline-leaf-500/50" />
          {p.band.words}
        </span>
        <span className="inline-flex items-center gap-1">
          <Mark name="feeding" className="text-soil-800" />
          feeding
        </span>
        {ahead && (
          <span className="inline-flex items-center gap-1">
            <span aria-hidden="true" className="inline-block w-4 border-t-2 border-dashed border-soil-800" />
            heading
          </span>
        )}
        {moments.length > 0 && (
          <span className="inline-flex items-center gap-1">
            <span aria-hidden="true" className="inline-block h-3 w-0.5 bg-soil-800" />
            {moments.map((m) => m.label).join(", ")}
          </span>
        )}
      </p>
    </figure>
  );
}
