import { getFarm } from "@/db/queries/farms";
import { listFarmProbesWithStatus } from "@/db/queries/probes";
import { listFarmRules } from "@/db/queries/rules";
import { probePresence, silentRuleFor } from "@/lib/domain/probe-presence";
import type { Who } from "@/lib/server/auth/authorize";

/** Every probe of the farm with its zone, battery, signal and presence: reporting, silent since when
 * (on the silent-probe rule's line for its bin), or no reading yet; and the farm's time zone to say it in. */
export async function listProbes(who: Pick<Who, "farmId">, now = new Date()) {
  const [rows, rules, farm] = await Promise.all([listFarmProbesWithStatus(who.farmId), listFarmRules(who.farmId, "silent_probe"), getFarm(who.farmId)]);
  return {
    /** When presence was judged: the screen says "2 min ago" from here, not from its own clock. */
    at: now,
    timeZone: farm?.timezone ?? "UTC",
    probes: rows.map(({ binSpecies, ...p }) => {
      const rule = silentRuleFor(rules, p.binId && binSpecies ? { id: p.binId, species: binSpecies } : null);
      return { ...p, presence: probePresence({ lastReadingAt: p.lastReadingAt, lastHeardAt: p.lastSeenAt, reportIntervalS: p.reportIntervalS }, rule, now) };
    }),
  };
}
