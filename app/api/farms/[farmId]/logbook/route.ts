import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { farmLogbookPage } from "@/lib/server/logbook/farm-logbook";
import { farmLogbookQuery } from "@/lib/domain/validation/logbook-filters";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/logbook?kind=&bin=&zone=&who=&from=&to=&before=&limit= — every kind of
// entry of the farm, newest first, with `older` (the next page's `before`) or null.
export const GET = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  const q = farmLogbookQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  return Response.json(await farmLogbookPage(who, q));
});
