// Who is posting to /api/ingest: a probe named by its bearer credential, not a person's session.
import type { Probe } from "@/db/schema";
import { verifyProbeToken } from "@/lib/server/probes/verify-token";
import { recordDoorRefusal } from "@/lib/server/probes/record-door-refusal";
import { AppError, errorResponse } from "@/lib/web/errors";

/**
 * `Authorization: Bearer <code>.<token>` — RFC 6750 §2.1's b64token has no ":", so the code and
 * token are joined by "." and split at the last one (tokens are base64url, without "."; codes may
 * hold "."). `Bearer <code>:<token>` is accepted too, split at the first ":" (codes cannot hold ":").
 */
export function parseProbeBearer(header: string | null): { code: string; token: string } | null {
  const m = /^Bearer +(\S+) *$/i.exec(header ?? "");
  if (!m) return null;
  const cred = m[1]!;
  const colon = cred.indexOf(":");
  const at = colon >= 0 ? colon : cred.lastIndexOf(".");
  if (at <= 0 || at === cred.length - 1) return null;
  return { code: cred.slice(0, at), token: cred.slice(at + 1) };
}

/** The probe whose code and token the request carries, or null (unknown code, wrong token, archived, none given). */
export async function probeFromBearer(req: Request): Promise<Probe | null> {
  const cred = parseProbeBearer(req.headers.get("authorization"));
  if (!cred) return null;
  const probe = await verifyProbeToken(cred.code, cred.token);
  // A known code with the wrong token shows on that probe's page (at most one row a minute).
  if (!probe) await recordDoorRefusal("http", cred.code, "wrong-token").catch(() => false);
  return probe;
}

// RFC 6750 §3: a 401 names the scheme, and error="invalid_token" when credentials were given.
export function probeUnauthorized(req: Request): Response {
  const given = req.headers.has("authorization");
  const res = errorResponse(
    new AppError("unauthenticated", given ? "The probe code or token is wrong, or the probe is archived." : "Send Authorization: Bearer <probe code>.<token>."),
  );
  res.headers.set("WWW-Authenticate", `Bearer realm="wormward"${given ? ', error="invalid_token"' : ""}`);
  return res;
}
