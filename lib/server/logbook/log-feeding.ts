import { insertFeeding } from "@/db/queries/feedings";
import { usableIngredientIds } from "@/db/queries/ingredients";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import { checkMix } from "@/lib/domain/mix";
import type { FeedingCreate } from "@/lib/domain/validation/logbook";
import type { feedingItems } from "@/db/schema";
import { entryRow } from "./entry-row";

/** The mix check of a feeding as stored, items in a fixed order, so the first answer and a replay's
 * answer are the same to the last digit. */
function storedMix(items: (typeof feedingItems.$inferSelect)[]) {
  const sorted = [...items].sort((a, b) => (a.id < b.id ? -1 : 1));
  return checkMix(
    sorted.map((i) => ({
      name: i.name,
      massKg: i.massKg,
      moisturePct: i.moisturePct,
      carbonPct: i.carbonPct ?? undefined,
      nitrogenPct: i.nitrogenPct ?? undefined,
    })),
  );
}

/** Logs a feeding with its mix check. Each item's ingredient must be the farm's own or the shared
 * library's; an unknown id and another farm's id get the same answer, so ids reveal nothing. Under a
 * clientKey the farm used before, the feeding stored then is the answer (`created` false). */
export async function logFeeding(who: Pick<Who, "farmId" | "userId">, binId: string, input: FeedingCreate & { clientKey?: string }) {
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
  const stored = await insertFeeding({
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
  const again = storedMix(stored.items);
  return { answer: { feeding: stored.feeding, mix: again.ok ? again.value : mix.value }, created: stored.created };
}
