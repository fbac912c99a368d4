// A farm that switches units sees its open alerts in the new units at once: each zone with an open
// alert is evaluated again for those kinds, which words the message anew in the farm's units (an
// "update" when only the words changed). The rule runner would do the same at the zone's next
// reading; a zone whose probes went quiet would otherwise keep the old units.
import { listAlerts } from "@/db/queries/alerts";
import type { RuleKind } from "@/lib/domain/rules";
import { evaluateZoneNow } from "./evaluate-zone";

export async function rewordOpenAlerts(farmId: string, at = new Date()) {
  const kinds = new Map<string, Set<RuleKind>>();
  for (const { alert } of await listAlerts(farmId, { open: true, limit: 500 })) {
    if (!alert.zoneId) continue;
    if (!kinds.has(alert.zoneId)) kinds.set(alert.zoneId, new Set());
    kinds.get(alert.zoneId)!.add(alert.kind);
  }
  for (const [zoneId, k] of kinds) await evaluateZoneNow(zoneId, at, { kinds: [...k] });
}
