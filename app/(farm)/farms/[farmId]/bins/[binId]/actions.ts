"use server";

import { revalidatePath } from "next/cache";
import { requireMember } from "@/lib/web/session";
import { setBinCycle } from "@/lib/server/bins/set-bin-cycle";
import { binCycleForm } from "@/lib/domain/validation/farm";
import { validatedAction } from "@/lib/web/validated-action";

// The bin page's own form: owners and keepers set the bin's feeding interval and planned harvest.
export const saveBinCycle = validatedAction(binCycleForm, async ({ binId, ...fields }) => {
  const who = await requireMember({ binId }, "log");
  const said = await setBinCycle(who, binId, fields);
  revalidatePath(`/farms/${who.farmId}/bins/${binId}`);
  return said;
});
