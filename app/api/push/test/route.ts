import { route } from "@/lib/web/api/route";
import { requireCrew } from "@/lib/web/crew";
import { testPush } from "@/lib/server/push/test-push";

// POST /api/push/test — sends a test notification to every phone of the caller; each result
// carries the status and a reason in our words, never what the push service answered.
export const POST = route(async () => {
  const who = await requireCrew();
  return Response.json(await testPush(who));
});
