"use server";

import { resendVerification } from "@/lib/server/auth/sign-up";
import { resendForm } from "@/lib/domain/validation/sign-up";
import { requireUser } from "@/lib/web/session";
import { validatedAction } from "@/lib/web/validated-action";

// The signed-in, unconfirmed person's own link; limited per person (lib/server/auth/sign-up.ts).
export const resendLink = validatedAction(resendForm, async () => resendVerification(await requireUser()));
