import { settleAlertAs } from "@/lib/alerts/crew";
import { route } from "@/lib/api/route";
import { requireMember } from "@/lib/auth/session";
import { readOptionalJson } from "@/lib/errors";
import { settleBody } from "@/lib/validation/alerts";

type Ctx = { params: Promise<{ alertId: string }> };

// POST /api/alerts/[alertId]/settle — settle by hand (a probe pulled out, a false alarm), with a note
export const POST = route(async (req, { params }: Ctx) => {
  const { alertId } = await params;
  const who = await requireMember({ alertId }, "log");
  const { note } = settleBody.parse(await readOptionalJson(req));
  return Response.json({ alert: await settleAlertAs(who, alertId, note) });
});
