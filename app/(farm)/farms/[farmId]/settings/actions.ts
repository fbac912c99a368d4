"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { archiveBin, updateBin } from "@/db/queries/bins";
import { updateFarm } from "@/db/queries/farms";
import { requireMember } from "@/lib/web/session";
import { AppError } from "@/lib/domain/errors";
import { UNIT_LABELS } from "@/lib/domain/units";
import { farmForm } from "@/lib/domain/validation/farm";
import { validatedAction } from "@/lib/web/validated-action";

const binForm = z.object({ farmId: z.string().uuid(), binId: z.string().uuid() });

// Every page of the farm shows its units and times, so the whole farm is rendered afresh.
const refreshFarm = (farmId: string) => revalidatePath(`/farms/${farmId}`, "layout");

export const saveFarm = validatedAction(farmForm, async ({ farmId, ...patch }) => {
  const who = await requireMember({ farmId }, "manage");
  await updateFarm(who.farmId, patch);
  refreshFarm(farmId);
  return `Saved. Temperatures in ${UNIT_LABELS[patch.unitSystem].temperature}, times in ${patch.timezone}.`;
});

async function ownBin(farmId: string, binId: string) {
  const who = await requireMember({ binId }, "manage");
  if (who.farmId !== farmId) throw new AppError("not_found", "That bin is not on this farm.");
}

export const archiveBinAction = validatedAction(binForm, async ({ farmId, binId }) => {
  await ownBin(farmId, binId);
  const bin = await archiveBin(binId);
  refreshFarm(farmId);
  return `${bin?.name ?? "The bin"} is archived; its readings and logbook stay.`;
});

export const bringBackBin = validatedAction(binForm, async ({ farmId, binId }) => {
  await ownBin(farmId, binId);
  const bin = await updateBin(binId, { archivedAt: null });
  refreshFarm(farmId);
  return `${bin?.name ?? "The bin"} is back on Today.`;
});
