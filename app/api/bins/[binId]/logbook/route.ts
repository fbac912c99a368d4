import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readLogbook } from "@/lib/server/logbook/read-logbook";
import { logbookQuery } from "@/lib/domain/validation/logbook";

type Ctx = { params: Promise<{ binId: string }> };

// GET /api/bins/[binId]/logbook — feedings (with items), waterings, shifts, harvests, notes and samples, newest first, with who
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const q = logbookQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await readLogbook(binId, q));
});
