import { asc, eq, isNull, or } from "drizzle-orm";
import { db } from "@/db";
import { ingredients } from "@/db/schema";
import { AppError } from "@/lib/errors";

// The shared library plus the farm's own, the farm's first.
export async function listIngredients(farmId: string) {
  return db()
    .select()
    .from(ingredients)
    .where(or(isNull(ingredients.farmId), eq(ingredients.farmId, farmId)))
    .orderBy(asc(ingredients.farmId), asc(ingredients.kind), asc(ingredients.name));
}

export async function addIngredient(farmId: string, input: Omit<typeof ingredients.$inferInsert, "farmId" | "id" | "createdAt">) {
  try {
    const [row] = await db().insert(ingredients).values({ ...input, farmId }).returning();
    return row!;
  } catch (e) {
    const code = (e as { code?: string; cause?: { code?: string } }).cause?.code ?? (e as { code?: string }).code;
    if (code === "23505") throw new AppError("conflict", "Your farm already has an ingredient with that name.", "name");
    throw e;
  }
}
