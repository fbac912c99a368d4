import { timingSafeEqual } from "node:crypto";
import { getProbeByCode } from "@/db/queries/probes";
import type { Executor } from "@/db/queries/readings";
import type { Probe } from "@/db/schema";
import { hashToken } from "@/lib/server/auth/tokens";

// Compared against when the code is unknown, so a miss costs the same as a wrong token.
const NO_HASH = Buffer.from(hashToken(""), "hex");

/** The probe these credentials name, or null when the code is unknown, the token wrong or the probe archived.
 * The one check for both doors: the broker's CONNECT and the HTTP bearer. */
export async function verifyProbeToken(code: string, token: string, ex?: Executor): Promise<Probe | null> {
  const probe = await getProbeByCode(code, ex);
  const given = Buffer.from(hashToken(token), "hex");
  const stored = probe && /^[0-9a-f]{64}$/.test(probe.tokenHash) ? Buffer.from(probe.tokenHash, "hex") : NO_HASH;
  const same = timingSafeEqual(given, stored);
  return probe && same && !probe.archivedAt ? probe : null;
}
