import { verifyProbeToken } from "@/db/queries/probes";
import { route } from "@/lib/web/api/route";
import { AppError, errorResponse } from "@/lib/web/errors";
import { acceptHttpTelemetry, parseProbeBearer, readTelemetryBody, requireSenmlJson } from "@/lib/server/ingest/http-ingest";
import { DEFAULT_LIMITS } from "@/lib/domain/telemetry";

// RFC 6750 §3: a 401 names the scheme, and error="invalid_token" when credentials were given.
function unauthorized(given: boolean): Response {
  const res = errorResponse(
    new AppError("unauthenticated", given ? "The probe code or token is wrong, or the probe is archived." : "Send Authorization: Bearer <probe code>.<token>."),
  );
  res.headers.set("WWW-Authenticate", `Bearer realm="wormward"${given ? ', error="invalid_token"' : ""}`);
  return res;
}

// POST /api/ingest — a probe posts one SenML pack; same validation and store as MQTT. No session:
// the probe's own credentials (see lib/server/ingest/http-ingest.ts for the bearer format).
export const POST = route(async (req) => {
  const cred = parseProbeBearer(req.headers.get("authorization"));
  const probe = cred ? await verifyProbeToken(cred.code, cred.token) : null;
  if (!probe) return unauthorized(req.headers.has("authorization"));
  requireSenmlJson(req.headers);
  const body = await readTelemetryBody(req, probe, DEFAULT_LIMITS.maxBytes);
  return Response.json(await acceptHttpTelemetry(probe, body), { status: 202 });
});
