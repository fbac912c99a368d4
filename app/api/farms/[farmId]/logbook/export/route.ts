import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { exportLogbook } from "@/lib/server/logbook/export-logbook";
import { logbookExportQuery } from "@/lib/domain/validation/logbook-filters";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/logbook/export?format=csv&kind=&bin=&zone=&who=&from=&to= — the logbook
// with the same filters as one CSV file; viewers may download it.
export const GET = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  const q = logbookExportQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  const file = await exportLogbook(who, q);
  return new Response(file.body, {
    headers: { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": `attachment; filename="${file.fileName}"`, "Cache-Control": "no-store" },
  });
});
