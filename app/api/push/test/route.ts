import { isCrewAnywhere } from "@/db/queries/push";
import { sendTestPush } from "@/lib/server/alerts/deliver";
import { route } from "@/lib/web/api/route";
import { requireUser } from "@/lib/web/session";
import { AppError } from "@/lib/domain/errors";

// POST /api/push/test — sends a test notification to every phone of the caller; each result
// carries the status and a reason in our words, never what the push service answered.
export const POST = route(async () => {
  const userId = await requireUser();
  if (!(await isCrewAnywhere(userId))) throw new AppError("forbidden", "Alerts go to keepers and owners; a viewer gets none.");
  const results = await sendTestPush(userId);
  if (results.length === 0) throw new AppError("not_found", "No phone of yours is set up for alerts yet.");
  return Response.json({ sent: results.filter((r) => r.ok).length, results });
});
