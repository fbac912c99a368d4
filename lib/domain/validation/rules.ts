import { z } from "zod";
import { ALERT_KINDS } from "../vocabulary";

/** PUT /api/bins/[binId]/rules: one kind's thresholds for this bin (checked key by key against the
 * kind's parameters in lib/domain/rules), or the kind turned off. */
export const binRuleInput = z.object({
  kind: z.enum(ALERT_KINDS),
  enabled: z.boolean().default(true),
  thresholds: z.record(z.string(), z.unknown()).default({}),
});
export type BinRuleInput = z.output<typeof binRuleInput>;

/** DELETE /api/bins/[binId]/rules?kind=heat: back to the species defaults for one kind. */
export const binRuleReset = z.object({ kind: z.enum(ALERT_KINDS) });

/** POST /api/bins/[binId]/rules/preview: the card's unsaved values, as a PUT would send them (the
 * thresholds are checked key by key the same way before anything is replayed). */
export const rulePreviewInput = z.object({
  kind: z.enum(ALERT_KINDS),
  enabled: z.boolean().default(true),
  thresholds: z.record(z.string(), z.unknown()).default({}),
});
export type RulePreviewInput = z.output<typeof rulePreviewInput>;
