import { setProbeTokenHash } from "@/db/queries/probes";
import type { Who } from "@/lib/server/auth/authorize";
import { hashToken } from "@/lib/server/auth/tokens";
import { AppError } from "@/lib/domain/errors";
import { newProbeToken, TOKEN_NOTE } from "./credentials";

/** Replaces a lost or leaked token: the old one stops working at once, the new one is shown once. */
export async function rotateProbeToken(who: Pick<Who, "farmId">, probeId: number) {
  const token = newProbeToken();
  if (!(await setProbeTokenHash(who.farmId, probeId, hashToken(token)))) throw new AppError("not_found", "Not found.");
  return { token, note: TOKEN_NOTE };
}
