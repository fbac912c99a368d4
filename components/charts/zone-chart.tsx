"use client";

import { useEffect, useMemo, useRef, useState } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { clockFormat } from "@/components/logbook/format";
import { useSeries } from "@/lib/client/hooks/use-series";
import { formatNumber, temperatureForDisplay, type UnitSystem } from "@/lib/domain/units";
import { Mark } from "@/components/ui/marks";
import {
  bindTouch,
  keepCursor,
  type HeldCursor,
  cursorWhen,
  drawMarks,
  eventMarks,
  KIND_WORDS,
  KINDS,
  levelWords,
  marksNear,
  marksWords,
  mergeMarks,
  tablesOf,
  timeLabels,
  type ChartMark,
} from "./chart-kit";
import { CursorLegend, MarkButtons, NO_READING, type CursorWords } from "./cursor-legend";
import { paletteColor, useColorScheme, withAlpha } from "./theme-colors";

export type { ChartMark } from "./chart-kit";
export type ChartMetric = "temperature" | "moisture" | "ammonia";
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
  /** Marks the caller words itself (a feeding with its mix check); the series' own logbook entries
   * (feedings, waterings, shifts, harvests) are drawn beside them, a caller's mark winning by id. */
  marks: readonly ChartMark[];
  /** The bin's zones, to say where a logbook entry was done. */
  binZones?: readonly { id: string; kind: string; name: string | null }[];
  /** A stored value in words ("23.4 °C, comfortable"). */
  describe: (stored: number) => string;
  /** Where the readings are heading (the rules' own rate or trend, per hour in stored units): drawn
   * as a dashed line on from the latest reading, into a short stretch of the time axis after now. */
  heading?: ChartHeading | null;
};

export type ChartHeading = { ratePerHour: number | null; crossingAt: number | null; words: string };

/** How far past now the axis runs when a heading is drawn: an eighth of the window. */
const AHEAD_SHARE = 0.125;
/** A heading is drawn on windows up to a month; over a year an hour's rate says nothing. */
const AHEAD_MAX_WINDOW_S = 31 * 86_400;
/** Above this many marks the chart draws them without buttons; the cursor names them instead. */
const MAX_MARK_BUTTONS = 24;

type Geom = { left: number; top: number; width: number; height: number; xMin: number; xMax: number; bandTop: number; bandBottom: number };

const HEIGHT = 210;
const RECENT_MS = 3 * 3_600_000;

// One metric of a zone over a window: mean line, min–max band when points are aggregates, the
// species' band shaded behind, and the logbook's entries as marks on the time axis. A finger or a
// mouse on the plot shows, in a large legend above it, the time and each line's value there.
export function ZoneChart(p: Props) {
  const { data, error, isLoading } = useSeries({ zoneId: p.zoneId }, { metric: p.metric, from: p.from, to: p.to });
  const box = useRef<HTMLDivElement>(null);
  const [geom, setGeom] = useState<Geom | null>(null);
  const [cursor, setCursor] = useState<CursorWords | null>(null);
  const held = useRef<HeldCursor>(null);
  const [picked, setPicked] = useState<string | null>(null);
  const scheme = useColorScheme();

  const clock = useMemo(() => clockFormat(p.timezone), [p.timezone]);
  const when = useMemo(() => cursorWhen(p.timezone), [p.timezone]);
  const conv = useMemo(() => (p.metric === "temperature" ? (v: number) => temperatureForDisplay(v, p.system) : (v: number) => v), [p.metric, p.system]);
  const aggregated = data?.bucketSeconds != null;
  const xMin = data ? Date.parse(data.from) / 1000 : 0;
  const xMax = data ? Date.parse(data.to) / 1000 : 1;
  const drawn = useMemo(() => (data ? tablesOf(data.series, data.bucketSeconds, conv, aggregated, xMin, xMax) : null), [data, conv, aggregated, xMin, xMax]);
  const serverMarks = useMemo(() => eventMarks(data?.events ?? [], p.binZones ?? [], p.system, clock), [data, p.binZones, p.system, clock]);
  // A live window also marks what was logged after its series was read, up to when the chart
  // opened (a feeding just logged on the bin page shows at once, before the series is read again),
  // drawn at the window's end.
  const [openedAt] = useState(() => Math.floor(Date.now() / 1000));
  const marks = useMemo(
    () => mergeMarks(p.marks, serverMarks, xMin, p.to ? xMax : Math.max(xMax, openedAt)).map((m) => (m.t > xMax ? { ...m, t: xMax } : m)),
    [p.marks, p.to, serverMarks, xMin, xMax, openedAt],
  );
  // A heading is drawn only on a window that ends now, up to a month long, and only with a rate to draw.
  const rate =
    !p.to && xMax - xMin <= AHEAD_MAX_WINDOW_S && p.heading?.ratePerHour != null && Number.isFinite(p.heading.ratePerHour) ? p.heading.ratePerHour : null;
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
    if (!el || !data || !drawn || drawn.tables.length === 0 || !summary) return;
    const tables = drawn.tables;
    const aligned = tables.length === 1 ? tables[0]! : uPlot.join(tables);
    const keep = keepCursor(held);
    const per = aggregated ? 3 : 1;
    // Colours from the palette as it is now (light or dark).
    const dark = scheme === "dark";
    const line = paletteColor(p.color);
    const bandFill = withAlpha(paletteColor("--color-leaf-500"), dark ? 0.24 : 0.18);
    const ink = paletteColor("--color-soil-800");
    const series: uPlot.Series[] = [{}];
    const bands: uPlot.Band[] = [];
    tables.forEach((_, k) => {
      series.push({
        label: drawn.lines[k]?.label ?? drawn.lines[k]?.code ?? `probe ${k + 1}`,
        stroke: line,
        width: 2,
        dash: k ? [6, 4] : undefined,
        points: { show: false },
      });
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
            // The logbook's entries: each kind's shape on the plot's top edge (a dashed line down while
            // they are few); the cursor's point is a round dot, so the two never mix. The tappable
            // marks sit on the time axis.
            const r = uPlot.pxRatio;
            drawMarks(u, marks, ink);
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
        ready: [measure, keep.ready],
        setSize: [measure],
        setCursor: [
          (u) => {
            const i = u.cursor.idx;
            const t = i == null ? undefined : u.data[0][i];
            const v = i == null ? undefined : u.data[1]?.[i];
            if (!keep.follow(u, v === undefined ? null : t)) return;
            if (t == null || v === undefined) {
              setCursor(null);
              return;
            }
            const num = (x: number | null | undefined) => (x == null ? "—" : formatNumber(x, 1));
            const rows = drawn.lines.map((s, k) => {
              const mean = u.data[1 + k * per]?.[i!];
              return {
                name: drawn.lines.length > 1 ? s.code : null,
                value: mean == null ? NO_READING : `${num(mean)} ${p.unit}`,
                range: aggregated && mean != null ? `low ${num(u.data[2 + k * per]?.[i!])} · high ${num(u.data[3 + k * per]?.[i!])}` : null,
              };
            });
            setCursor({ when: when(drawn.starts.get(t) ?? t, data.bucketSeconds), rows, near: marksNear(u, marks, u.cursor.left ?? -1) });
            // Moving along the line hands the legend back from a picked mark to the cursor.
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
  }, [
    data,
    drawn,
    summary,
    aggregated,
    conv,
    when,
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
    ? `${p.title}, ${p.rangeWords}: ${latestWords}; lowest ${formatNumber(conv(summary.lo), 1)}, highest ${formatNumber(conv(summary.hi), 1)} ${p.unit}; ${p.band.words} shaded; ${marksWords(marks)}${moments.map((m) => `; ${m.label} at ${clock(m.t * 1000)}`).join("")}${ahead && p.heading ? `; dashed on from the latest reading: ${p.heading.words}` : ""}.`
    : `${p.title}, ${p.rangeWords}: no readings.`;
  const kindsShown = KINDS.filter((k) => k === "feeding" || marks.some((m) => m.kind === k));
  const points = data?.series.reduce((n, s) => n + s.t.length, 0) ?? 0;
  const firstT = data?.series.reduce((a, s) => (s.t.length ? Math.min(a, s.t[0]!) : a), Infinity);
  const lastT = data?.series.reduce((a, s) => (s.t.length ? Math.max(a, s.t[s.t.length - 1]!) : a), -Infinity);

  return (
    <figure className="rounded-2xl bg-white p-3 ring-1 ring-soil-300" data-metric={p.metric}>
      <figcaption className="flex items-baseline justify-between gap-2">
        <h3 className="text-lg font-bold">{p.title}</h3>
        <span className="tabular text-sm text-soil-700">
          {data ? (aggregated ? `${levelWords(data.bucketSeconds)}, low–high shaded` : levelWords(null)) : ""}
        </span>
      </figcaption>
      <CursorLegend
        cursor={cursor}
        minHeight="min-h-[6.75rem]"
        idle={
          pickedMark ? (
            <span className="flex items-start gap-1.5 text-lg">
              <Mark name={pickedMark.kind ?? "feeding"} size={18} className="mt-1" />
              <span>{pickedMark.detail}</span>
            </span>
          ) : (
            <span className="block text-lg">{latestWords ? latestWords.replace(/^./, (c) => c.toUpperCase()) : ""}</span>
          )
        }
      />
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
            data-source={data.source}
            data-bucket-seconds={data.bucketSeconds ?? undefined}
            data-points={points}
            data-first-t={firstT}
            data-last-t={lastT}
            data-marks={marks.length}
          />
          {geom && marks.length > 0 && marks.length <= MAX_MARK_BUTTONS && (
            <MarkButtons
              marks={marks}
              title={p.title}
              picked={picked}
              onPick={setPicked}
              x={(t) => geom.left + ((t - geom.xMin) / (geom.xMax - geom.xMin)) * geom.width}
              top={geom.top + geom.height - 30}
            />
          )}
        </div>
      )}
      <p className="mt-2 flex flex-wrap items-center gap-x-3 gap-y-1 text-xs text-soil-700">
        <span className="inline-flex items-center gap-1">
          {/* Classes, not style=: the content security policy refuses style attributes in HTML. */}
          <span aria-hidden="true" className="inline-block h-3 w-4 rounded-sm bg-leaf-500/20 outline outline-1 outline-leaf-500/50" />
          {p.band.words}
        </span>
        {kindsShown.map((k) => (
          <span key={k} className="inline-flex items-center gap-1">
            <Mark name={k} className="text-soil-800" />
            {KIND_WORDS[k].one}
          </span>
        ))}
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
