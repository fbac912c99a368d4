"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { updateQuietHours } from "@/db/queries/push";
import { requireUser } from "@/lib/auth/session";
import { validatedAction } from "@/lib/validated-action";

const hhmm = z.union([z.literal(""), z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, "Use a time like 22:00.")]);
const quietHoursForm = z
  .object({ quietFrom: hhmm, quietTo: hhmm, timezone: z.string().trim().min(1, "Choose a timezone.").max(64) })
  .refine((v) => (v.quietFrom === "") === (v.quietTo === ""), { message: "Give both ends, or clear both.", path: ["quietTo"] })
  .refine((v) => { try { new Intl.DateTimeFormat("en", { timeZone: v.timezone }); return true; } catch { return false; } }, { message: "Unknown timezone.", path: ["timezone"] });

export const saveQuietHours = validatedAction(quietHoursForm, async (input) => {
  const userId = await requireUser();
  await updateQuietHours(userId, { quietFrom: input.quietFrom || null, quietTo: input.quietTo || null, timezone: input.timezone });
  revalidatePath("/me");
  return input.quietFrom ? `Quiet from ${input.quietFrom} to ${input.quietTo}; act-now alerts still come through.` : "Quiet hours cleared.";
});
