import { importCsv, listImports } from "@/db/queries/imports";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readImportUpload } from "@/lib/domain/validation/imports";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/imports — the farm's logger imports, newest first, with their reports
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json({ imports: await listImports(who.farmId) });
});

// POST /api/farms/[farmId]/imports — owners import a logger CSV with a column mapping; 201 with
// the report, or 200 with the earlier import when the same file and mapping came before
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const upload = await readImportUpload(req);
  const outcome = await importCsv({ farmId: who.farmId, userId: who.userId, ...upload });
  return Response.json(outcome, { status: outcome.duplicate ? 200 : 201 });
});
