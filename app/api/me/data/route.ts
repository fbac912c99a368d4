import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { exportMyData } from "@/lib/server/people/my-data";

// GET /api/me/data — everything of mine and of the farms I own, as a JSON file to keep
export const GET = route(async () => {
  const userId = await requireUser();
  const data = await exportMyData(userId);
  return Response.json(data, { headers: { "Content-Disposition": `attachment; filename="wormward-my-data-${data.exportedAt.slice(0, 10)}.json"` } });
});
