import { settleAlertAs } from "@/lib/server/alerts/crew";
import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readOptionalJson } from "@/lib/web/errors";
import { settleBody } from "@/lib/domain/validation/alerts";

type Ctx = { params: Promise<{ alertId: string }> };

// POST /api/alerts/[alertId]/settle — settle by hand (a probe pulled out, a false alarm), with a note
export const POST = route(async (req, { params }: Ctx) => {
  const { alertId } = await params;
  const who = await requireMember({ alertId }, "log");
  const { note } = settleBody.parse(await readOptionalJson(req));
  return Response.json({ alert: await settleAlertAs(who, alertId, note) });
});
