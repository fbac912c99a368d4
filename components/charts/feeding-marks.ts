import { feedingVerdict, zoneWords } from "@/components/logbook/format";
import type { Feeding } from "@/lib/client/wire";
import { formatMass, formatNumber, formatPercent, type UnitSystem } from "@/lib/domain/units";
import type { ChartMark } from "./zone-chart";

/** The bin's feedings that concern a zone (its own and whole-bin ones) as marks on its charts. */
export function feedingMarks(
  feedings: readonly Feeding[],
  zoneId: string,
  binZones: readonly { id: string; kind: string; name: string | null }[],
  system: UnitSystem,
  clock: (t: string | number) => string,
): ChartMark[] {
  return feedings
    .filter((f) => f.zoneId === zoneId || f.zoneId === null)
    .map((f) => {
      const where = zoneWords(binZones.find((z) => z.id === f.zoneId));
      const kg = f.totalKg ?? f.items.reduce((s, i) => s + i.massKg, 0);
      const verdict = feedingVerdict(f) ?? "no verdict";
      const mix = [
        f.mixMoisturePct != null ? `moisture ${formatPercent(f.mixMoisturePct, { digits: 1 })}` : null,
        f.mixCn != null ? `C:N ${formatNumber(f.mixCn, 1)}` : null,
      ].filter(Boolean);
      return {
        id: f.id,
        t: Date.parse(f.at) / 1000,
        label: `Feeding ${clock(f.at)}, ${where}: ${formatMass(kg, system, { digits: 2 })}, ${verdict}`,
        detail: `Fed ${clock(f.at)} · ${where} · ${formatMass(kg, system, { digits: 2 })} · ${[...mix, verdict].join(" · ")}${f.byName ? ` · by ${f.byName}` : ""}`,
      };
    });
}
