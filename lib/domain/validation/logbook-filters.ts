import { z } from "zod";
import { LOG_KINDS, METRICS_STORED } from "../vocabulary";

// The farm logbook's filters and the exports' choices, from a URL's search params: a filter is a
// link anyone can share or reload. An empty value (a form's "any") means no filter.
const blankAsUndefined = (v: unknown) => (v === "" ? undefined : v);
const uuidFilter = (message: string) => z.preprocess(blankAsUndefined, z.uuid({ message }).optional());

// A farm-local calendar day, as an <input type="date"> sends it (HTML "valid date string", ISO 8601).
const DAY = /^(\d{4})-(\d{2})-(\d{2})$/;
const realDay = (s: string) => {
  const m = DAY.exec(s);
  if (!m) return false;
  const d = new Date(Date.UTC(+m[1]!, +m[2]! - 1, +m[3]!));
  return d.getUTCFullYear() >= 2000 && d.getUTCMonth() === +m[2]! - 1 && d.getUTCDate() === +m[3]!;
};
const day = (what: string) =>
  z.preprocess(
    blankAsUndefined,
    z
      .string({ message: `Give ${what} as a date, e.g. 2026-05-01.` })
      .trim()
      .refine(realDay, `Give ${what} as a real date from 2000 on, e.g. 2026-05-01.`)
      .optional(),
  );

/** `before`: where the next older page begins, as the list's last entry (its time and id). */
export const LOGBOOK_CURSOR = /^(\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}(?:\.\d{1,6})?Z)~([0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12})$/i;
export const logbookCursor = (e: { atExact: string; id: string }) => `${e.atExact}~${e.id}`;

const fromTo = <T extends { from?: string; to?: string }>(v: T) => !v.from || !v.to || v.from <= v.to;
const fromToIssue = { message: "The end date is before the start date; swap them.", path: ["to"] };

export const logbookFilters = {
  kind: z.preprocess(blankAsUndefined, z.enum(LOG_KINDS, { message: `Choose a kind: ${LOG_KINDS.join(", ")}.` }).optional()),
  bin: uuidFilter("Choose a bin from the list."),
  zone: uuidFilter("Choose a zone from the list."),
  who: uuidFilter("Choose a person from the list."),
  /** First farm-local day shown, inclusive. */
  from: day("the start date"),
  /** Last farm-local day shown, inclusive. */
  to: day("the end date"),
};

/** The farm logbook page and GET /api/farms/[farmId]/logbook. */
export const farmLogbookQuery = z
  .object({
    ...logbookFilters,
    before: z.preprocess(
      blankAsUndefined,
      z
        .string()
        .regex(LOGBOOK_CURSOR, "Use the “older entries” link to page back.")
        .transform((s) => {
          const m = LOGBOOK_CURSOR.exec(s)!;
          return { at: m[1]!, id: m[2]!.toLowerCase() };
        })
        .optional(),
    ),
    limit: z.preprocess(blankAsUndefined, z.coerce.number().int("Give limit as a whole number.").min(1).max(200).default(50)),
  })
  .refine(fromTo, fromToIssue);
export type FarmLogbookQuery = z.output<typeof farmLogbookQuery>;
export const FARM_LOGBOOK_FIELDS = ["kind", "bin", "zone", "who", "from", "to", "before"] as const;

/** GET /api/farms/[farmId]/logbook/export: the same filters, one format. */
export const logbookExportQuery = z
  .object({ ...logbookFilters, format: z.preprocess(blankAsUndefined, z.enum(["csv"], { message: "Choose the format csv." }).default("csv")) })
  .refine(fromTo, fromToIssue);
export type LogbookExportQuery = z.output<typeof logbookExportQuery>;

/** Numeric metrics a probe stores (firmware is text and stays on the probe). */
export const EXPORT_METRICS = METRICS_STORED;
const metricList = z.preprocess(
  (v) => (v === "" || v === undefined ? undefined : Array.isArray(v) ? v : String(v).split(",")),
  z
    .array(z.enum(EXPORT_METRICS, { message: `Choose metrics from: ${EXPORT_METRICS.join(", ")}.` }))
    .min(1)
    .optional(),
);

/** GET /api/farms/[farmId]/readings/export: a zone or a bin, two farm-local days (inclusive), which metrics. */
export const readingsExportQuery = z
  .object({
    format: z.preprocess(blankAsUndefined, z.enum(["csv", "senml"], { message: "Choose the format csv or senml." }).default("csv")),
    zoneId: uuidFilter("Choose a zone from the list."),
    binId: uuidFilter("Choose a bin from the list."),
    from: day("the start date").pipe(z.string({ message: "Give the start date, e.g. 2026-05-01." })),
    to: day("the end date").pipe(z.string({ message: "Give the end date, e.g. 2026-05-01." })),
    metric: metricList,
  })
  .refine((v) => !!v.zoneId !== !!v.binId, { message: "Choose one zone or one bin.", path: ["zoneId"] })
  .refine(fromTo, fromToIssue);
export type ReadingsExportQuery = z.output<typeof readingsExportQuery>;
