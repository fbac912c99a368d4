"use server";

import { revalidatePath } from "next/cache";
import { requireMember } from "@/lib/web/session";
import { archiveBinAs } from "@/lib/server/bins/archive-bin";
import { bringBackBinAs } from "@/lib/server/bins/bring-back-bin";
import { updateFarmSettings } from "@/lib/server/farms/update-farm";
import { UNIT_LABELS } from "@/lib/domain/units";
import { binOfFarmForm, farmForm } from "@/lib/domain/validation/farm";
import { validatedAction } from "@/lib/web/validated-action";

// Every page of the farm shows its units and times, so the whole farm is rendered afresh.
const refreshFarm = (farmId: string) => revalidatePath(`/farms/${farmId}`, "layout");

export const saveFarm = validatedAction(farmForm, async ({ farmId, ...patch }) => {
  const who = await requireMember({ farmId }, "manage");
  const farm = await updateFarmSettings(who, patch);
  refreshFarm(farmId);
  return `Saved. Temperatures in ${UNIT_LABELS[farm.unitSystem].temperature}, times in ${farm.timezone}, bins fed every ${farm.feedingIntervalDays} days unless a bin says otherwise.`;
});

export const archiveBinAction = validatedAction(binOfFarmForm, async ({ farmId, binId }) => {
  const bin = await archiveBinAs(await requireMember({ farmId }, "manage"), binId);
  refreshFarm(farmId);
  return `${bin.name} is archived; its readings and logbook stay.`;
});

export const bringBackBin = validatedAction(binOfFarmForm, async ({ farmId, binId }) => {
  const bin = await bringBackBinAs(await requireMember({ farmId }, "manage"), binId);
  refreshFarm(farmId);
  return `${bin.name} is back on Today.`;
});
