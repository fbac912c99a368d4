import { z } from "zod";
import { getBin } from "@/db/queries/bins";
import { deleteBinRule, listRulesForBin, upsertBinRule } from "@/db/queries/rules";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { AppError, readJson } from "@/lib/web/errors";
import { ALERT_KINDS, checkThresholds, defaultRuleTable, overridesFromRuleRows, resolveRules, type RuleRow } from "@/lib/domain/rules";
import { getSpecies } from "@/lib/domain/species";

type Ctx = { params: Promise<{ binId: string }> };

const ruleBody = z.object({
  kind: z.enum(ALERT_KINDS),
  enabled: z.boolean().default(true),
  thresholds: z.record(z.string(), z.unknown()).default({}),
});
const resetQuery = z.object({ kind: z.enum(ALERT_KINDS) });

async function binSpecies(binId: string) {
  const bin = await getBin(binId);
  const species = bin ? getSpecies(bin.species) : null;
  if (!bin || !species) throw new AppError("not_found", "Not found.");
  return { bin, species };
}

// GET /api/bins/[binId]/rules — each alert kind's defaults for the species, the overrides, and what applies
export const GET = route(async (_req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "read");
  const { species } = await binSpecies(binId);
  const rows = (await listRulesForBin(who.farmId, binId)) as RuleRow[];
  const overrides = overridesFromRuleRows(rows, binId);
  return Response.json({ species: species.id, defaults: defaultRuleTable(species), overrides, effective: resolveRules(species, overrides) });
});

// PUT /api/bins/[binId]/rules — owners override one kind's thresholds for this bin, or turn it off
export const PUT = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "manage");
  const body = ruleBody.parse(await readJson(req));
  const checked = checkThresholds(body.kind, body.thresholds);
  if (!checked.ok) throw new AppError("invalid", checked.error.message, checked.error.field);
  const row = await upsertBinRule(who.farmId, binId, body.kind, checked.value, body.enabled);
  return Response.json({ rule: row });
});

// DELETE /api/bins/[binId]/rules?kind=heat — owners go back to the species defaults for one kind
export const DELETE = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "manage");
  const { kind } = resetQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json({ removed: await deleteBinRule(who.farmId, binId, kind) });
});
