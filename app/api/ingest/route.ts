import { route } from "@/lib/web/api/route";
import { readSenmlBody } from "@/lib/web/api/senml-body";
import { probeFromBearer, probeUnauthorized } from "@/lib/web/probe-auth";
import { acceptHttpTelemetry } from "@/lib/server/ingest/http-ingest";

// POST /api/ingest — a probe posts one SenML pack; same validation and store as MQTT. No session:
// the probe's own credentials (see lib/web/probe-auth.ts for the bearer format).
export const POST = route(async (req) => {
  const probe = await probeFromBearer(req);
  if (!probe) return probeUnauthorized(req);
  const posted = await readSenmlBody(req);
  return Response.json(await acceptHttpTelemetry(probe, posted), { status: 202 });
});
