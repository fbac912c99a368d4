import { randomBytes } from "node:crypto";
import { replaceProbeToken } from "@/db/queries/probes";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";

type Ctx = { params: Promise<{ probeId: string }> };

// POST /api/probes/[probeId]/token — owners replace a lost or leaked token; the old one stops working
export const POST = route(async (_req, { params }: Ctx) => {
  const { probeId } = await params;
  const id = Number(probeId);
  await requireMember({ probeId: id }, "manage");
  const token = randomBytes(24).toString("base64url");
  await replaceProbeToken(id, token);
  return Response.json({ token, note: "Copy the token now: it is shown only once." }, { headers: { "cache-control": "no-store" } });
});
