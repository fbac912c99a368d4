import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { binRulesView } from "@/lib/server/rules/bin-rules-view";
import { resetBinRule } from "@/lib/server/rules/reset-bin-rule";
import { setBinRule } from "@/lib/server/rules/set-bin-rule";
import { binRuleInput, binRuleReset } from "@/lib/domain/validation/rules";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId]/rules — each alert kind's defaults for the species, the overrides, and what applies
export const GET = route(async (_req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "read");
  return Response.json(await binRulesView(who, binId));
});

// PUT /api/bins/[binId]/rules — owners override one kind's thresholds for this bin, or turn it off
export const PUT = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "manage");
  const input = binRuleInput.parse(await readJson(req));
  return Response.json(await setBinRule(who, binId, input));
});

// DELETE /api/bins/[binId]/rules?kind=heat — owners go back to the species defaults for one kind
export const DELETE = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "manage");
  const { kind } = binRuleReset.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await resetBinRule(who, binId, kind));
});
