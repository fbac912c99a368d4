import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { previewBinRule } from "@/lib/server/rules/preview";
import { rulePreviewInput } from "@/lib/domain/validation/rules";

type Ctx = { params: Promise<{ binId: string }> };

// POST /api/bins/[binId]/rules/preview — owners see what an unsaved change to one kind would have
// raised over the bin's last 30 days, beside what the saved rules would have; nothing is stored
export const POST = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "manage");
  const input = rulePreviewInput.parse(await readJson(req));
  return Response.json(await previewBinRule(who, binId, input));
});
