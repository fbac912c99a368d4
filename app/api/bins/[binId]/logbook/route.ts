import { z } from "zod";
import { listLogbook } from "@/db/queries/logbook";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";

type Ctx = { params: Promise<{ binId: string }> };
const listQuery = z.object({ limit: z.coerce.number().int().min(1).max(500).default(100) });

// GET /api/bins/[binId]/logbook — feedings, waterings, harvests, notes and samples, newest first, with who
export const GET = route(async (req, { params }: Ctx) => {
  const { binId } = await params;
  await requireMember({ binId }, "read");
  const q = listQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json({ entries: await listLogbook(binId, q) });
});
