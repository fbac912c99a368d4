import { dayWords, monthWords } from "@/lib/domain/bin-cycle";
import { formatMass, type UnitSystem } from "@/lib/domain/units";

// Bar widths in steps of 5 % as whole class names, so Tailwind finds them and no style= is needed
// (the content security policy allows none).
const WIDTHS = [
  "w-0",
  "w-[5%]",
  "w-[10%]",
  "w-[15%]",
  "w-[20%]",
  "w-[25%]",
  "w-[30%]",
  "w-[35%]",
  "w-[40%]",
  "w-[45%]",
  "w-[50%]",
  "w-[55%]",
  "w-[60%]",
  "w-[65%]",
  "w-[70%]",
  "w-[75%]",
  "w-[80%]",
  "w-[85%]",
  "w-[90%]",
  "w-[95%]",
  "w-full",
];
const widthOf = (v: number, most: number) => WIDTHS[most > 0 ? Math.max(v > 0 ? 1 : 0, Math.round((v / most) * 20)) : 0]!;

function Bars({ label, rows, system }: { label: string; rows: { key: string; name: string; massKg: number; note?: string }[]; system: UnitSystem }) {
  const most = Math.max(0, ...rows.map((r) => r.massKg));
  return (
    <ul aria-label={label} className="mt-1 space-y-1.5">
      {rows.map((r) => (
        <li key={r.key} className="grid grid-cols-[4.5rem_1fr_auto] items-center gap-2">
          <span className="text-sm text-soil-700">{r.name}</span>
          <span aria-hidden="true" className="block h-4 rounded-sm bg-soil-100">
            <span className={`block h-4 rounded-sm bg-leaf-500 ${widthOf(r.massKg, most)}`} />
          </span>
          <span className="tabular text-right text-sm font-bold whitespace-nowrap">
            {formatMass(r.massKg, system)}
            {r.note ? <span className="block text-xs font-normal text-soil-700">{r.note}</span> : null}
          </span>
        </li>
      ))}
    </ul>
  );
}

/** Castings harvested from a bin: each harvest, and each month's total (months without one are 0). */
export function YieldsChart({
  perHarvest,
  perMonth,
  system,
  today,
}: {
  perHarvest: { on: string; massKg: number }[];
  perMonth: { month: string; massKg: number; count: number }[];
  system: UnitSystem;
  today: string;
}) {
  if (perHarvest.length === 0) return <p className="mt-1 text-soil-700">No harvest logged in the last two years.</p>;
  const recent = perHarvest.slice(-12);
  const total = perHarvest.reduce((s, h) => s + h.massKg, 0);
  return (
    <div className="space-y-3">
      <p className="text-sm text-soil-700">
        {perHarvest.length} harvest{perHarvest.length === 1 ? "" : "s"} in the last two years, {formatMass(total, system)} of castings in all.
      </p>
      <div>
        <h3 className="font-bold">Per harvest{recent.length < perHarvest.length ? " (the last 12)" : ""}</h3>
        <Bars
          label="Castings per harvest"
          rows={recent.map((h, i) => ({ key: `${h.on}-${i}`, name: dayWords(h.on, today), massKg: h.massKg }))}
          system={system}
        />
      </div>
      <div>
        <h3 className="font-bold">Per month</h3>
        <Bars
          label="Castings per month"
          rows={perMonth.slice(-12).map((m) => ({
            key: m.month,
            name: monthWords(m.month),
            massKg: m.massKg,
            note: m.count === 0 ? "(no harvest)" : m.count > 1 ? `(${m.count} harvests)` : undefined,
          }))}
          system={system}
        />
      </div>
    </div>
  );
}
