import { insertFeeding } from "@/db/queries/feedings";
import { usableIngredientIds } from "@/db/queries/ingredients";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import { checkMix } from "@/lib/domain/mix";
import type { FeedingCreate } from "@/lib/domain/validation/logbook";
import { entryRow } from "./entry-row";

/** Logs a feeding with its mix check. Each item's ingredient must be the farm's own or the shared
 * library's; an unknown id and another farm's id get the same answer, so ids reveal nothing. */
export async function logFeeding(who: Pick<Who, "farmId" | "userId">, binId: string, input: FeedingCreate) {
  const mix = checkMix(
    input.items.map((i) => ({
      name: i.name,
      massKg: i.massKg,
      moisturePct: i.moisturePct,
      carbonPct: i.carbonPct ?? undefined,
      nitrogenPct: i.nitrogenPct ?? undefined,
      cn: i.cn ?? undefined,
    })),
  );
  // lib/domain/mix names fields from the items array already ("items.0.cn").
  if (!mix.ok) throw new AppError("invalid", mix.error.message, mix.error.field);

  const asked = input.items.flatMap((i) => (i.ingredientId ? [i.ingredientId] : []));
  const usable = asked.length ? await usableIngredientIds(who.farmId, asked) : new Set<string>();
  const bad = input.items.findIndex((i) => i.ingredientId && !usable.has(i.ingredientId));
  if (bad >= 0)
    throw new AppError("invalid", "That ingredient is not in this farm's list or the shared library; choose one from the list.", `items.${bad}.ingredientId`);

  const { items, ...common } = input;
  const feeding = await insertFeeding({
    ...(await entryRow(who, binId, common)),
    mixMoisturePct: mix.value.moisturePct,
    mixCn: mix.value.cn,
    totalKg: mix.value.totalMassKg,
    items: items.map((i) => ({
      ingredientId: i.ingredientId ?? null,
      name: i.name,
      massKg: i.massKg,
      moisturePct: i.moisturePct,
      carbonPct: i.carbonPct ?? (i.cn != null && i.nitrogenPct != null ? i.cn * i.nitrogenPct : null),
      nitrogenPct: i.nitrogenPct ?? null,
    })),
  });
  return { feeding, mix: mix.value };
}
