import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { exportReadings } from "@/lib/server/exports/export-readings";
import { readingsExportQuery } from "@/lib/domain/validation/logbook-filters";

type Ctx = { params: Promise<{ farmId: string }> };

// GET /api/farms/[farmId]/readings/export?format=csv|senml&zoneId=|binId=&from=&to=&metric=a,b — a
// zone's or a bin's readings over farm-local days, as a file; viewers may download it.
export const GET = route(async (req, { params }: Ctx) => {
  const { farmId } = await params;
  const who = await requireMember({ farmId }, "read");
  const q = readingsExportQuery.parse(Object.fromEntries(new URL(req.url).searchParams));
  const file = await exportReadings(who, q);
  return new Response(file.body, {
    headers: { "Content-Type": file.contentType, "Content-Disposition": `attachment; filename="${file.fileName}"`, "Cache-Control": "no-store" },
  });
});
