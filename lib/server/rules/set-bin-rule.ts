import { upsertBinRule } from "@/db/queries/rules";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";
import { checkThresholds } from "@/lib/domain/rules";
import type { BinRuleInput } from "@/lib/domain/validation/rules";

/** An owner overrides one kind's thresholds for this bin, or turns the kind off there. */
export async function setBinRule(who: Pick<Who, "farmId">, binId: string, input: BinRuleInput) {
  const checked = checkThresholds(input.kind, input.thresholds);
  if (!checked.ok) throw new AppError("invalid", checked.error.message, checked.error.field);
  return { rule: await upsertBinRule(who.farmId, binId, input.kind, checked.value, input.enabled) };
}
