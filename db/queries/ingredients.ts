import { and, asc, eq, inArray, isNull, or } from "drizzle-orm";
import { db } from "@/db";
import { ingredients } from "@/db/schema";
import { AppError } from "@/lib/domain/errors";

// The shared library plus the farm's own, the farm's first.
export async function listIngredients(farmId: string) {
  return db()
    .select()
    .from(ingredients)
    .where(or(isNull(ingredients.farmId), eq(ingredients.farmId, farmId)))
    .orderBy(asc(ingredients.farmId), asc(ingredients.kind), asc(ingredients.name));
}

/** Of `ids`, those a farm may use: the shared library's (no farm) and the farm's own. */
export async function usableIngredientIds(farmId: string, ids: string[]): Promise<Set<string>> {
  const rows = await db()
    .select({ id: ingredients.id })
    .from(ingredients)
    .where(and(inArray(ingredients.id, ids), or(isNull(ingredients.farmId), eq(ingredients.farmId, farmId))));
  return new Set(rows.map((r) => r.id));
}

export async function addIngredient(farmId: string, input: Omit<typeof ingredients.$inferInsert, "farmId" | "id" | "createdAt">) {
  try {
    const [row] = await db()
      .insert(ingredients)
      .values({ ...input, farmId })
      .returning();
    return row!;
  } catch (e) {
    const code = (e as { code?: string; cause?: { code?: string } }).cause?.code ?? (e as { code?: string }).code;
    if (code === "23505") throw new AppError("conflict", "Your farm already has an ingredient with that name.", "name");
    throw e;
  }
}
