import { z } from "zod";
import { longText, timeZone } from "./fields";
import { ALERT_KINDS, ALERT_LEVELS, ALERT_STATES } from "../vocabulary";

const hhmm = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, "Use a time like 22:00.");

export const pushSubscriptionBody = z.object({
  // Which push services this server sends to is configuration, and whether a name is an address of
  // our own network takes node:net: lib/server/push/subscribe.ts checks both before saving.
  endpoint: z.string({ message: "The push endpoint must be a URL." }).max(2048, "The push endpoint is too long."),
  keys: z.object({
    p256dh: z.string().regex(/^[A-Za-z0-9_-]{80,100}$/, "p256dh must be a base64url P-256 public key."),
    auth: z.string().regex(/^[A-Za-z0-9_-]{16,24}$/, "auth must be a base64url 16-octet secret."),
  }),
});
export const pushUnsubscribeBody = z.object({ endpoint: z.string().url() });
export type PushSubscriptionBody = z.output<typeof pushSubscriptionBody>;

// PATCH /api/me: only what is named changes. Both ends of quiet hours, when both are named, must
// agree; when one is named, lib/server/people/update-me.ts checks it against the stored other end.
export const meUpdate = z
  .object({
    quietFrom: hhmm.nullable().optional(),
    quietTo: hhmm.nullable().optional(),
    timezone: timeZone.optional(),
  })
  .refine((v) => v.quietFrom === undefined || v.quietTo === undefined || (v.quietFrom === null) === (v.quietTo === null), {
    message: "Give both ends of quiet hours, or neither.",
    path: ["quietTo"],
  });
export type MeUpdate = z.infer<typeof meUpdate>;

// The "You" page's form posts every field, and an empty time there means no quiet hours: the same
// schema as PATCH /api/me once the empty times are read as null.
const blankTimesAsNull = (raw: unknown) => {
  if (!raw || typeof raw !== "object") return raw;
  const form = raw as Record<string, unknown>;
  return { ...form, quietFrom: form.quietFrom === "" ? null : form.quietFrom, quietTo: form.quietTo === "" ? null : form.quietTo };
};
export const meForm = z.preprocess(blankTimesAsNull, meUpdate);

export const settleBody = z.object({ note: longText("The note", { max: 500 }).optional() }).default({});
// The alert history's filters, from a URL's search params: a filter is a link. An empty value (a
// form's "any") means no filter.
const blankAsUndefined = (v: unknown) => (v === "" ? undefined : v);
const STATE_CHOICES = ["open", "all", ...ALERT_STATES] as const;
const filters = {
  bin: z.preprocess(blankAsUndefined, z.uuid({ message: "Choose a bin from the list." }).optional()),
  kind: z.preprocess(blankAsUndefined, z.enum(ALERT_KINDS, { message: `Choose a kind: ${ALERT_KINDS.join(", ")}.` }).optional()),
  level: z.preprocess(blankAsUndefined, z.enum(ALERT_LEVELS, { message: `Choose a level: ${ALERT_LEVELS.join(", ")}.` }).optional()),
  // Kept as text: the database keeps microseconds, which a Date would round away.
  before: z.preprocess(
    blankAsUndefined,
    z.iso.datetime({ offset: true, message: "Give before as an ISO 8601 time with a zone, e.g. 2026-05-01T00:00:00Z." }).optional(),
  ),
  // With before: the last alert of the page before, so alerts raised at the same instant are neither skipped nor repeated.
  beforeId: z.preprocess(blankAsUndefined, z.uuid({ message: "beforeId must be an alert's id." }).optional()),
};
const stateField = (fallback: (typeof STATE_CHOICES)[number]) =>
  z.preprocess(blankAsUndefined, z.enum(STATE_CHOICES, { message: `Choose a state: ${STATE_CHOICES.join(", ")}.` }).default(fallback));

/** GET /api/farms/[farmId]/alerts: the open ones unless a state is named. */
export const alertListQuery = z.object({ state: stateField("open"), ...filters });
export type AlertListQuery = z.output<typeof alertListQuery>;
/** The history page: every state unless one is named. */
export const alertHistoryQuery = z.object({ state: stateField("all"), ...filters });
export type AlertHistoryQuery = z.output<typeof alertHistoryQuery>;
