"use server";

import { revalidatePath } from "next/cache";
import { requireUser } from "@/lib/web/session";
import { updateMe } from "@/lib/server/people/update-me";
import { quietHoursForm } from "@/lib/domain/validation/alerts";
import { validatedAction } from "@/lib/web/validated-action";

export const saveQuietHours = validatedAction(quietHoursForm, async (input) => {
  const userId = await requireUser();
  await updateMe(userId, { quietFrom: input.quietFrom || null, quietTo: input.quietTo || null, timezone: input.timezone });
  revalidatePath("/me");
  return input.quietFrom ? `Quiet from ${input.quietFrom} to ${input.quietTo}; act-now alerts still come through.` : "Quiet hours cleared.";
});
