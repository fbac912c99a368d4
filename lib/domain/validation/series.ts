import { z } from "zod";
import { METRICS_STORED } from "@/lib/domain/vocabulary";

export const DAY_MS = 86_400_000;
/** The longest range one request may ask for. */
export const MAX_RANGE_DAYS = 400;

const instant = (field: string) =>
  z.iso
    .datetime({ offset: true, message: `Give ${field} as an ISO 8601 time with a zone, e.g. 2025-05-01T00:00:00Z.` })
    .transform((s) => new Date(s))
    .optional();

// ?metric=temperature&from=…&to=… — the range defaults to the last 24 h before `to` (or now).
export const seriesQuery = z
  .object({
    metric: z.enum(METRICS_STORED, { message: `Choose a metric: ${METRICS_STORED.join(", ")}.` }),
    from: instant("from"),
    to: instant("to"),
  })
  .transform((q, ctx) => {
    const to = q.to ?? new Date();
    const from = q.from ?? new Date(to.getTime() - DAY_MS);
    if (from >= to) {
      ctx.addIssue({ code: "custom", path: ["from"], message: "from must be before to." });
      return z.NEVER;
    }
    if (to.getTime() - from.getTime() > MAX_RANGE_DAYS * DAY_MS) {
      ctx.addIssue({ code: "custom", path: ["from"], message: `Ask for at most ${MAX_RANGE_DAYS} days at a time.` });
      return z.NEVER;
    }
    return { metric: q.metric, from, to };
  });
export type SeriesQuery = z.output<typeof seriesQuery>;
