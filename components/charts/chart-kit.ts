// What the zone's and the bin's charts share: time words in the farm's zone, the logbook's marks
// (drawn on the canvas with the registry's shapes) and a cursor a thumb can drag.
import uPlot from "uplot";
import { zoneWords } from "@/components/logbook/format";
import { MARKS } from "@/components/ui/mark-shapes";
import type { Series } from "@/lib/client/wire";
import { formatMass, formatVolume, type UnitSystem } from "@/lib/domain/units";
import { withAlpha } from "./theme-colors";

export type ChartEventKind = "feeding" | "watering" | "shift" | "harvest";
export type ChartEventWire = NonNullable<Series["events"]>[number];
/** A logbook entry drawn on the time axis; t in Unix seconds. `kind` defaults to a feeding. */
export type ChartMark = { id: string; t: number; label: string; detail: string; kind?: ChartEventKind };

/** Each kind's word, as the legend and the cursor say it. */
export const KIND_WORDS: Record<ChartEventKind, { one: string; many: string }> = {
  feeding: { one: "feeding", many: "feedings" },
  watering: { one: "watering", many: "waterings" },
  shift: { one: "shift", many: "shifts" },
  harvest: { one: "harvest", many: "harvests" },
};
export const KINDS: readonly ChartEventKind[] = ["feeding", "watering", "shift", "harvest"];

type ZoneRef = { id: string; kind: string; name: string | null };

/** The server's logbook entries as marks, in the farm's units. */
export function eventMarks(
  events: readonly ChartEventWire[],
  binZones: readonly ZoneRef[],
  system: UnitSystem,
  clock: (t: string | number) => string,
): ChartMark[] {
  const zone = (id: string | null) => zoneWords(binZones.find((z) => z.id === id));
  return events.map((e) => {
    const when = clock(e.at);
    const by = e.byName ? ` · by ${e.byName}` : "";
    const mass = e.massKg != null ? formatMass(e.massKg, system, { digits: 2 }) : null;
    const t = Date.parse(e.at) / 1000;
    if (e.kind === "watering") {
      const vol = e.litres != null ? formatVolume(e.litres, system) : "";
      return { id: e.id, t, kind: e.kind, label: `Watering ${when}, ${zone(e.zoneId)}: ${vol}`, detail: `Watered ${when} · ${zone(e.zoneId)} · ${vol}${by}` };
    }
    if (e.kind === "shift") {
      const to = e.toZoneId ? zone(e.toZoneId) : "the next zone";
      const vol = e.volumeL != null ? ` · ${formatVolume(e.volumeL, system)}` : "";
      return {
        id: e.id,
        t,
        kind: e.kind,
        label: `Shift ${when}: ${zone(e.zoneId)} to ${to}`,
        detail: `Shifted ${when} · ${zone(e.zoneId)} → ${to}${vol}${by}`,
      };
    }
    if (e.kind === "harvest") {
      const vol = e.volumeL != null ? ` · ${formatVolume(e.volumeL, system)}` : "";
      return {
        id: e.id,
        t,
        kind: e.kind,
        label: `Harvest ${when}, ${zone(e.zoneId)}: ${mass ?? ""}`,
        detail: `Harvested ${when} · ${zone(e.zoneId)} · ${mass ?? ""}${vol}${by}`,
      };
    }
    return {
      id: e.id,
      t,
      kind: "feeding" as const,
      label: `Feeding ${when}, ${zone(e.zoneId)}: ${mass ?? ""}`,
      detail: `Fed ${when} · ${zone(e.zoneId)}${mass ? ` · ${mass}` : ""}${by}`,
    };
  });
}

/** The caller's marks (richer words, e.g. a feeding's mix check) and the server's others, in time order. */
export function mergeMarks(given: readonly ChartMark[], fromServer: readonly ChartMark[], xMin: number, xMax: number): ChartMark[] {
  const ids = new Set(given.map((m) => m.id));
  return [...given, ...fromServer.filter((m) => !ids.has(m.id))].filter((m) => m.t >= xMin && m.t <= xMax).sort((a, b) => a.t - b.t);
}

/** "1 watering and 2 feedings marked": feedings last, as the alert page's words always had them. */
export function marksWords(marks: readonly ChartMark[]): string {
  const count = (k: ChartEventKind) => marks.filter((m) => (m.kind ?? "feeding") === k).length;
  const words = (k: ChartEventKind, n: number) => `${n} ${n === 1 ? KIND_WORDS[k].one : KIND_WORDS[k].many}`;
  const others = (["watering", "shift", "harvest"] as const).filter((k) => count(k) > 0).map((k) => words(k, count(k)));
  const fed = count("feeding");
  const parts = fed > 0 || others.length === 0 ? [...others, words("feeding", fed)] : others;
  return `${parts.length > 1 ? `${parts.slice(0, -1).join(", ")} and ${parts.at(-1)}` : parts[0]} marked`;
}

export function safeFormat(timeZone: string, opts: Intl.DateTimeFormatOptions) {
  try {
    return new Intl.DateTimeFormat("en-GB", { ...opts, timeZone });
  } catch {
    return new Intl.DateTimeFormat("en-GB", { ...opts, timeZone: "UTC" });
  }
}

// Time-axis labels in the farm's zone: 24-hour clock, the day ("2 Dec") at midnight or when ticks
// are a day or more apart, the month ("Mar") when they are a month apart.
export function timeLabels(timeZone: string) {
  const hm = safeFormat(timeZone, { hour: "2-digit", minute: "2-digit", hourCycle: "h23" });
  const dm = safeFormat(timeZone, { day: "numeric", month: "short" });
  const mon = safeFormat(timeZone, { month: "short" });
  return (_u: uPlot, splits: number[], _i: number, _s: number, incr: number) =>
    splits.map((t) => {
      const d = new Date(t * 1000);
      if (incr >= 28 * 86_400) return mon.format(d);
      const time = hm.format(d);
      return incr >= 86_400 || time === "00:00" ? dm.format(d) : time;
    });
}

/** What the cursor's point stands for, in the farm's zone: a reading's moment ("Tue 3 Jun, 14:05"),
 * a bucket's span ("Tue 3 Jun, 06:00–12:00") or a day ("Tue 3 Jun 2025"). */
export function cursorWhen(timeZone: string) {
  const day = safeFormat(timeZone, { weekday: "short", day: "numeric", month: "short" });
  const year = safeFormat(timeZone, { weekday: "short", day: "numeric", month: "short", year: "numeric" });
  const hm = safeFormat(timeZone, { hour: "2-digit", minute: "2-digit", hourCycle: "h23" });
  return (start: number, bucketSeconds: number | null) => {
    const d = new Date(start * 1000);
    if (bucketSeconds == null) return `${day.format(d)}, ${hm.format(d)}`;
    if (bucketSeconds >= 86_400) return year.format(d);
    return `${day.format(d)}, ${hm.format(d)}–${hm.format(new Date((start + bucketSeconds) * 1000))}`;
  };
}

/** The bucket words a caption says: "every reading", "5-min means", "hourly means", "6-hourly means", "daily means". */
export function levelWords(bucketSeconds: number | null): string {
  if (bucketSeconds == null) return "every reading";
  if (bucketSeconds >= 86_400) return "daily means";
  if (bucketSeconds === 3600) return "hourly means";
  if (bucketSeconds > 3600) return `${bucketSeconds / 3600}-hourly means`;
  return `${Math.round(bucketSeconds / 60)}-min means`;
}

const shapes = new Map<string, Path2D>();
function shapeOf(kind: ChartEventKind): Path2D {
  let p = shapes.get(kind);
  if (!p) shapes.set(kind, (p = new Path2D(MARKS[kind].d)));
  return p;
}

/** Marks on the plot: each kind's shape from the registry on the plot's top edge, and, while they
 * are few enough to read, a dashed line down through the plot. Call from a drawClear hook. */
export function drawMarks(u: uPlot, marks: readonly ChartMark[], ink: string) {
  const ctx = u.ctx;
  const r = uPlot.pxRatio;
  const size = 11 * r;
  ctx.save();
  ctx.lineWidth = r;
  const lines = marks.length <= 30;
  for (const m of marks) {
    const x = Math.round(u.valToPos(m.t, "x", true)) + 0.5;
    if (lines) {
      ctx.strokeStyle = withAlpha(ink, 0.5);
      ctx.setLineDash([4 * r, 4 * r]);
      ctx.beginPath();
      ctx.moveTo(x, u.bbox.top + size);
      ctx.lineTo(x, u.bbox.top + u.bbox.height);
      ctx.stroke();
      ctx.setLineDash([]);
    }
    ctx.save();
    ctx.translate(x - size / 2, u.bbox.top);
    ctx.scale(size / 12, size / 12);
    ctx.fillStyle = ink;
    ctx.fill(shapeOf(m.kind ?? "feeding"), "evenodd");
    ctx.restore();
  }
  ctx.restore();
}

/** The marks within `px` CSS pixels of the cursor's left edge. */
export function marksNear(u: uPlot, marks: readonly ChartMark[], left: number, px = 10): ChartMark[] {
  return marks.filter((m) => Math.abs(u.valToPos(m.t, "x") - left) <= px);
}

/** A finger on the plot moves the cursor: a tap puts it there and a sideways drag moves it along,
 * while an up-and-down drag still scrolls the page (touch-action: pan-y). uPlot follows the mouse
 * alone; a finger's drag reaches it through pointer events. */
export function bindTouch(u: uPlot): () => void {
  const over = u.over;
  over.style.touchAction = "pan-y";
  const move = (e: PointerEvent) => {
    if (e.pointerType === "mouse") return;
    const b = over.getBoundingClientRect();
    const left = Math.min(Math.max(e.clientX - b.left, 0), b.width);
    u.setCursor({ left, top: Math.min(Math.max(e.clientY - b.top, 0), b.height) });
  };
  over.addEventListener("pointerdown", move);
  over.addEventListener("pointermove", move);
  return () => {
    over.removeEventListener("pointerdown", move);
    over.removeEventListener("pointermove", move);
  };
}

/** Where a finger left the cursor, kept across the plot being rebuilt: a data refresh makes a new
 * uPlot, whose first (empty) cursor must not wipe the legend the keeper is reading. */
export type HeldCursor = { t: number; top: number } | null;

/** Hooks that keep the cursor on the same moment through a rebuild. `held` outlives each plot. */
export function keepCursor(held: { current: HeldCursor }) {
  return {
    /** After a rebuild: put the cursor back on its moment when that moment is still drawn. */
    ready(u: uPlot) {
      const h = held.current;
      const min = u.scales.x?.min;
      const max = u.scales.x?.max;
      if (!h || min == null || max == null || h.t < min || h.t > max) return;
      u.setCursor({ left: u.valToPos(h.t, "x"), top: h.top });
    },
    /** On each cursor move: whether the legend should follow it (false for the new plot's empty
     * first cursor, which is not the keeper moving away). */
    follow(u: uPlot, t: number | null | undefined): boolean {
      if (t == null) {
        if (u.status === 0) return false;
        held.current = null;
        return true;
      }
      held.current = { t, top: u.cursor.top ?? 0 };
      return true;
    },
  };
}

/** The ranges a chart offers; the window's start is fixed when it is chosen. */
export const CHART_RANGES = [
  { value: "24h", label: "24 h", days: 1, words: "last 24 hours" },
  { value: "7d", label: "7 days", days: 7, words: "last 7 days" },
  { value: "30d", label: "30 days", days: 30, words: "last 30 days" },
  { value: "1y", label: "1 year", days: 365, words: "last 12 months" },
] as const;
export type ChartRange = (typeof CHART_RANGES)[number]["value"];

/** The ISO start of a range chosen now (to the minute, so an SWR key stays put); none for 24 h,
 * which is the server's default and what a page primes. */
export function rangeStart(r: ChartRange): string | undefined {
  const days = CHART_RANGES.find((x) => x.value === r)!.days;
  return r === "24h" ? undefined : new Date(Math.floor(Date.now() / 60_000) * 60_000 - days * 86_400_000).toISOString();
}

function medianStep(t: readonly number[]): number {
  if (t.length < 2) return 60;
  const d = t
    .slice(1)
    .map((x, i) => x - t[i]!)
    .sort((a, b) => a - b);
  return d[Math.floor(d.length / 2)]!;
}

type Line = { t: readonly number[]; mean: readonly number[]; min: readonly number[]; max: readonly number[] };

// One table per line with points: mean (and min/max with `withRange`), with an explicit null where
// readings stop for more than three steps, so a silent probe shows as a gap rather than a ramp. A
// bucket is drawn at its middle (kept inside the window), so a year's last day ends near now;
// `starts` maps each drawn time back to its bucket's start for the cursor's words.
export function tablesOf<L extends Line>(
  all: readonly L[],
  bucketSeconds: number | null,
  conv: (v: number) => number,
  withRange: boolean,
  xMin: number,
  xMax: number,
) {
  const starts = new Map<number, number>();
  const lines = all.filter((s) => s.t.length > 0);
  const half = bucketSeconds ? bucketSeconds / 2 : 0;
  const tables = lines.map((s) => {
    const at = s.t.map((x) => {
      const t = half ? Math.min(Math.max(x + half, xMin), xMax) : x;
      starts.set(t, x);
      return t;
    });
    const step = bucketSeconds ?? medianStep(s.t);
    const t: number[] = [];
    const cols: (number | null)[][] = withRange ? [[], [], []] : [[]];
    at.forEach((x, i) => {
      if (i > 0 && x - at[i - 1]! > 3 * step) {
        t.push(at[i - 1]! + step);
        cols.forEach((c) => c.push(null));
      }
      t.push(x);
      cols[0]!.push(conv(s.mean[i]!));
      if (withRange) {
        cols[1]!.push(conv(s.min[i]!));
        cols[2]!.push(conv(s.max[i]!));
      }
    });
    return [t, ...cols] as uPlot.AlignedData;
  });
  return { tables, lines, starts };
}
