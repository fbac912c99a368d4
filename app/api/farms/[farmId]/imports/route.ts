import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readImportUpload } from "@/lib/web/import-body";
import { importCsv } from "@/lib/server/imports/import-csv";
import { listImports } from "@/lib/server/imports/list-imports";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/imports — the farm's logger imports, newest first, with their reports
export const GET = route(async (_req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  return Response.json(await listImports(who));
});

// POST /api/farms/[farmId]/imports — owners import a logger CSV with a column mapping; 201 with
// the report, or 200 with the earlier import when the same file and mapping came before
export const POST = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "manage");
  const outcome = await importCsv(who, await readImportUpload(req));
  return Response.json(outcome, { status: outcome.duplicate ? 200 : 201 });
});
