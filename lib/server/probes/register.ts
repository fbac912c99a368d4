import { insertProbe } from "@/db/queries/probes";
import type { Who } from "@/lib/server/auth/authorize";
import { hashToken } from "@/lib/server/auth/tokens";
import { AppError } from "@/lib/domain/errors";
import type { ProbeCreate } from "@/lib/domain/validation/probes";
import { newProbeToken, TOKEN_NOTE } from "./credentials";
import { requireZoneOfFarm } from "./zone-of-farm";

/** Registers a probe on the farm. Its token is in this answer only; only its hash is stored. */
export async function registerProbe(who: Pick<Who, "farmId">, input: ProbeCreate) {
  await requireZoneOfFarm(who.farmId, input.zoneId);
  const token = newProbeToken();
  const probe = await insertProbe({
    farmId: who.farmId,
    zoneId: input.zoneId ?? null,
    code: input.code,
    label: input.label ?? null,
    metrics: input.metrics,
    reportIntervalS: input.reportIntervalS,
    tokenHash: hashToken(token),
  });
  if (!probe) throw new AppError("conflict", "Another probe already uses that code.", "code");
  return { probe, token, note: TOKEN_NOTE };
}
