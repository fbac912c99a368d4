"use server";

import { redirect } from "next/navigation";
import { startFarm } from "@/lib/server/farms/start-farm";
import { startFarmForm } from "@/lib/domain/validation/sign-up";
import { requireUser } from "@/lib/web/session";
import { validatedAction, type ActionState } from "@/lib/web/validated-action";

const start = validatedAction(startFarmForm, async (input) => {
  const farm = await startFarm(await requireUser(), input);
  return `/farms/${farm.id}`;
});

// Started: straight to the new farm's Today.
export async function startFarmAction(prev: ActionState, form: FormData): Promise<ActionState> {
  const result = await start(prev, form);
  if (result.ok) redirect(result.ok);
  return result;
}
