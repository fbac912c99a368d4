import { and, asc, eq, inArray, isNull, or } from "drizzle-orm";
import { db } from "@/db";
import { ingredients } from "@/db/schema";

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

/** The new row, or null when the farm already has one with that key. */
export async function insertIngredient(farmId: string, input: Omit<typeof ingredients.$inferInsert, "farmId" | "id" | "createdAt">) {
  const [row] = await db()
    .insert(ingredients)
    .values({ ...input, farmId })
    .onConflictDoNothing({ target: [ingredients.farmId, ingredients.key] })
    .returning();
  return row ?? null;
}
