"use server";

import { revalidatePath } from "next/cache";
import { requireUser } from "@/lib/web/session";
import { updateMe } from "@/lib/server/people/update-me";
import { meForm } from "@/lib/domain/validation/alerts";
import { validatedAction } from "@/lib/web/validated-action";

export const saveQuietHours = validatedAction(meForm, async (patch) => {
  const userId = await requireUser();
  await updateMe(userId, patch);
  revalidatePath("/me");
  return patch.quietFrom ? `Quiet from ${patch.quietFrom} to ${patch.quietTo}; act-now alerts still come through.` : "Quiet hours cleared.";
});
