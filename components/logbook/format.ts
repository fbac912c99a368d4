import { zonedFormat } from "@/lib/domain/clock";
import { checkMix, type MixVerdict } from "@/lib/domain/mix";
import type { Feeding } from "@/lib/client/wire";
import { zoneName } from "@/lib/domain/zone-words";

// Times print in the farm's own time zone, so the server's first paint and the phone agree.
export function clockFormat(timeZone: string): (iso: string | number) => string {
  return zonedFormat(timeZone, { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit" });
}

/** The mix check's verdict for a logged feeding, recomputed from its stored items. */
export function feedingVerdict(f: Pick<Feeding, "items">): MixVerdict | null {
  return feedingCheck(f)?.verdict ?? null;
}

/** Every issue the mix check finds in a logged feeding ([] when balanced); null when it cannot check. */
export function feedingIssues(f: Pick<Feeding, "items">): MixVerdict[] | null {
  return feedingCheck(f)?.issues ?? null;
}

function feedingCheck(f: Pick<Feeding, "items">) {
  const r = checkMix(
    f.items.map((i) => ({
      massKg: i.massKg,
      moisturePct: i.moisturePct,
      carbonPct: i.carbonPct ?? undefined,
      nitrogenPct: i.nitrogenPct ?? undefined,
    })),
  );
  return r.ok ? r.value : null;
}

export const zoneWords = (z: { kind: string; name: string | null } | null | undefined) => (z ? zoneName(z) : "Whole bin");
