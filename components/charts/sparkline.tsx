"use client";

import { useEffect, useRef } from "react";
import { paletteColor, useColorScheme, withAlpha } from "./theme-colors";

type Props = {
  points: readonly (readonly [string, number])[];
  band: [number, number];
  /** A palette variable ("--color-clay-500") or a colour. */
  color: string;
  label: string;
};

/** CSS pixels; the canvas's class says the same (h-14). */
const HEIGHT = 56;

// A small 24 h chart with the species' comfortable band shaded behind the line. Drawn straight on a
// canvas: a line and a band need no axes, cursor or legend, and Today (the page opened most, on a
// phone) then loads no chart library.
export function Sparkline({ points, band, color, label }: Props) {
  const ref = useRef<HTMLCanvasElement>(null);
  const scheme = useColorScheme();
  useEffect(() => {
    const canvas = ref.current;
    if (!canvas || points.length < 2) return;
    const xs = points.map((p) => Date.parse(p[0]));
    const ys = points.map((p) => p[1]);
    const lo = Math.min(band[0], ...ys);
    const hi = Math.max(band[1], ...ys);
    const pad = (hi - lo) * 0.1 || 1;
    const [yMin, yMax] = [lo - pad, hi + pad];
    const [x0, x1] = [xs[0]!, xs.at(-1)!];
    const stroke = paletteColor(color);
    const bandFill = withAlpha(paletteColor("--color-leaf-500"), scheme === "dark" ? 0.22 : 0.14);
    const draw = () => {
      const width = canvas.clientWidth || 160;
      const ratio = window.devicePixelRatio || 1;
      canvas.width = Math.round(width * ratio);
      canvas.height = Math.round(HEIGHT * ratio);
      const ctx = canvas.getContext("2d");
      if (!ctx) return;
      ctx.setTransform(ratio, 0, 0, ratio, 0, 0);
      ctx.clearRect(0, 0, width, HEIGHT);
      const line = 2;
      const x = (t: number) => (x1 === x0 ? width / 2 : ((t - x0) / (x1 - x0)) * (width - line) + line / 2);
      const y = (v: number) => ((yMax - v) / (yMax - yMin)) * HEIGHT;
      ctx.fillStyle = bandFill;
      ctx.fillRect(0, y(band[1]), width, y(band[0]) - y(band[1]));
      ctx.strokeStyle = stroke;
      ctx.lineWidth = line;
      ctx.lineJoin = "round";
      ctx.beginPath();
      xs.forEach((t, i) => (i === 0 ? ctx.moveTo(x(t), y(ys[i]!)) : ctx.lineTo(x(t), y(ys[i]!))));
      ctx.stroke();
    };
    draw();
    const ro = new ResizeObserver(draw);
    ro.observe(canvas);
    return () => ro.disconnect();
  }, [points, band, color, scheme]);
  if (points.length < 2) {
    return <div className="flex h-14 items-center text-sm text-soil-500">No readings in the last 24 h</div>;
  }
  return <canvas ref={ref} role="img" aria-label={label} className="block h-14 w-full" />;
}
