"use client";

import { useEffect, useRef } from "react";
import uPlot from "uplot";
import "uplot/dist/uPlot.min.css";
import { paletteColor, useColorScheme, withAlpha } from "./theme-colors";

type Props = {
  points: readonly (readonly [string, number])[];
  band: [number, number];
  /** A palette variable ("--color-clay-500") or a colour. */
  color: string;
  label: string;
  height?: number;
};

// A small 24 h chart with the species' comfortable band shaded behind the line.
export function Sparkline({ points, band, color, label, height = 56 }: Props) {
  const ref = useRef<HTMLDivElement>(null);
  const scheme = useColorScheme();
  useEffect(() => {
    const el = ref.current;
    if (!el || points.length < 2) return;
    const xs = points.map((p) => Date.parse(p[0]) / 1000);
    const ys = points.map((p) => p[1]);
    const lo = Math.min(band[0], ...ys);
    const hi = Math.max(band[1], ...ys);
    const pad = (hi - lo) * 0.1 || 1;
    const stroke = paletteColor(color);
    const bandFill = withAlpha(paletteColor("--color-leaf-500"), scheme === "dark" ? 0.22 : 0.14);
    const opts: uPlot.Options = {
      width: el.clientWidth || 160,
      height,
      legend: { show: false },
      cursor: { show: false },
      select: { show: false, left: 0, top: 0, width: 0, height: 0 },
      axes: [{ show: false }, { show: false }],
      scales: { x: { time: true }, y: { range: [lo - pad, hi + pad] } },
      series: [{}, { stroke, width: 2, points: { show: false } }],
      hooks: {
        drawClear: [
          (u) => {
            const top = u.valToPos(band[1], "y", true);
            const bottom = u.valToPos(band[0], "y", true);
            u.ctx.save();
            u.ctx.fillStyle = bandFill;
            u.ctx.fillRect(u.bbox.left, top, u.bbox.width, bottom - top);
            u.ctx.restore();
          },
        ],
      },
    };
    const plot = new uPlot(opts, [xs, ys], el);
    const ro = new ResizeObserver(() => plot.setSize({ width: el.clientWidth, height }));
    ro.observe(el);
    return () => {
      ro.disconnect();
      plot.destroy();
    };
  }, [points, band, color, height, scheme]);
  if (points.length < 2) {
    return <div className="flex h-14 items-center text-sm text-soil-500">No readings in the last 24 h</div>;
  }
  return <div ref={ref} role="img" aria-label={label} className="w-full" />;
}
