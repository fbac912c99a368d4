"use client";

import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { Mark, type MarkName } from "@/components/ui/marks";
import { formatNumber } from "@/lib/domain/units";
import { paletteColor, useColorScheme, withAlpha } from "./theme-colors";

/** A would-be alert on the time axis: t in Unix seconds, `to` null while it would still be open. */
export type ChartSpan = { from: number; to: number | null; strong: boolean };

type Props = {
  /** Hourly means, t in Unix seconds, values in display units. */
  t: readonly number[];
  v: readonly number[];
  from: number;
  to: number;
  timezone: string;
  /** The spans the changed rule would have raised (shaded), and what the saved rules would have (a strip below). */
  spans: readonly ChartSpan[];
  nowSpans: readonly ChartSpan[];
  /** Heads-up and act-now lines in display units, drawn dashed. */
  lines: { headsUp: number | null; actNow: number | null } | null;
  color: string;
  /** The kind's mark, set above the plot where each would-be alert begins. */
  mark: MarkName;
  /** What the chart shows, for screen readers (the spans are listed in words beside it). */
  label: string;
};

const HEIGHT = 150;

function dayLabels(timeZone: string) {
  let f: Intl.DateTimeFormat;
  try {
    f = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", timeZone });
  } catch {
    f = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", timeZone: "UTC" });
  }
  return (_u: uPlot, splits: number[]) => splits.map((t) => f.format(new Date(t * 1000)));
}

// A month of one metric for the rule preview: the hourly line, the would-be alerts shaded where they
// begin and end (act now darker), the saved rules' alerts as a strip along the bottom, and the rule's
// lines dashed. uPlot draws on a canvas; the words beside the chart say the same.
export function PreviewChart(p: Props) {
  const box = useRef<HTMLDivElement>(null);
  const starts = useRef<(HTMLSpanElement | null)[]>([]);
  const scheme = useColorScheme();

  useEffect(() => {
    const el = box.current;
    if (!el || p.t.length === 0) return;
    const dark = scheme === "dark";
    const line = paletteColor(p.color);
    const alertFill = paletteColor("--color-clay-500");
    const ink = paletteColor("--color-soil-800");
    const soil = paletteColor("--color-soil-500");
    const values = [...p.v, ...(p.lines ? [p.lines.headsUp, p.lines.actNow].filter((x): x is number => x !== null) : [])];
    const lo = Math.min(...values);
    const hi = Math.max(...values);
    const pad = (hi - lo) * 0.1 || 1;
    const font = `12px ${getComputedStyle(el).fontFamily}`;
    const axis = {
      stroke: paletteColor("--color-soil-700"),
      font,
      grid: { stroke: paletteColor("--color-soil-100"), width: 1 },
      ticks: { stroke: paletteColor("--color-soil-300"), width: 1 },
    };
    const opts: uPlot.Options = {
      width: el.clientWidth || 320,
      height: HEIGHT,
      legend: { show: false },
      cursor: { show: false },
      select: { show: false, left: 0, top: 0, width: 0, height: 0 },
      scales: { x: { time: true, range: [p.from, p.to] }, y: { range: [lo - pad, hi + pad] } },
      axes: [
        { ...axis, space: 56, values: dayLabels(p.timezone) },
        { ...axis, size: 40, values: (_u, splits, _i, _s, incr) => splits.map((v) => formatNumber(v, incr < 1 ? 1 : 0)) },
      ],
      series: [{}, { stroke: line, width: 1.5, points: { show: false } }],
      hooks: {
        drawClear: [
          (u) => {
            const ctx = u.ctx;
            const { top, height } = u.bbox;
            const x = (t: number) => u.valToPos(Math.min(Math.max(t, p.from), p.to), "x", true);
            ctx.save();
            for (const s of p.spans) {
              const a = x(s.from);
              const b = Math.max(x(s.to ?? p.to), a + 3 * uPlot.pxRatio);
              ctx.fillStyle = withAlpha(alertFill, s.strong ? (dark ? 0.5 : 0.42) : dark ? 0.3 : 0.22);
              ctx.fillRect(a, top, b - a, height);
              // A firm edge where each would-be alert begins.
              ctx.fillStyle = alertFill;
              ctx.fillRect(a, top, uPlot.pxRatio, height);
            }
            const strip = 5 * uPlot.pxRatio;
            ctx.fillStyle = soil;
            for (const s of p.nowSpans) {
              const a = x(s.from);
              const b = Math.max(x(s.to ?? p.to), a + 3 * uPlot.pxRatio);
              ctx.fillRect(a, top + height - strip, b - a, strip);
            }
            ctx.restore();
          },
        ],
        draw: [
          (u) => {
            if (!p.lines) return;
            const ctx = u.ctx;
            ctx.save();
            ctx.strokeStyle = ink;
            ctx.lineWidth = uPlot.pxRatio;
            for (const [v, dash] of [
              [p.lines.headsUp, [4, 4]],
              [p.lines.actNow, [10, 4]],
            ] as const) {
              if (v === null) continue;
              const y = u.valToPos(v, "y", true);
              ctx.setLineDash(dash.map((d) => d * uPlot.pxRatio));
              ctx.beginPath();
              ctx.moveTo(u.bbox.left, y);
              ctx.lineTo(u.bbox.left + u.bbox.width, y);
              ctx.stroke();
            }
            ctx.restore();
          },
        ],
      },
    };
    const plot = new uPlot(opts, [p.t as number[], p.v as number[]], el);
    // The marks above the plot, moved to where each span begins (CSSOM: no style attributes).
    const placeMarks = () =>
      p.spans.forEach((s, i) => {
        const m = starts.current[i];
        if (m) m.style.left = `${plot.bbox.left / uPlot.pxRatio + plot.valToPos(Math.max(s.from, p.from), "x")}px`;
      });
    placeMarks();
    const ro = new ResizeObserver(() => {
      plot.setSize({ width: el.clientWidth || 320, height: HEIGHT });
      placeMarks();
    });
    ro.observe(el);
    return () => {
      ro.disconnect();
      plot.destroy();
    };
  }, [p.t, p.v, p.from, p.to, p.timezone, p.spans, p.nowSpans, p.lines, p.color, scheme]);

  return (
    <div>
      <div aria-hidden="true" className="relative h-4">
        {p.spans.map((s, i) => (
          <span
            key={`${s.from}:${i}`}
            ref={(m) => {
              starts.current[i] = m;
            }}
            className={`absolute top-0 -translate-x-1/2 ${s.strong ? "text-clay-700" : "text-clay-500"}`}
          >
            <Mark name={p.mark} />
          </span>
        ))}
      </div>
      <div ref={box} role="img" aria-label={p.label} className="w-full" />
    </div>
  );
}
