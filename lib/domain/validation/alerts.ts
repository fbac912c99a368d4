import { z } from "zod";
import { configuredAllowList, endpointProblem } from "@/lib/server/push/push-policy";
import { longText, timeZone } from "./fields";

const hhmm = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, "Use a time like 22:00.");

export const pushSubscriptionBody = z.object({
  // Only a browser push service's https endpoint: a subscription must not become a way for us to
  // POST into our own network (OWASP Server-Side Request Forgery Prevention Cheat Sheet).
  endpoint: z
    .string()
    .max(2048, "The push endpoint is too long.")
    .superRefine((u, ctx) => {
      const problem = endpointProblem(u, configuredAllowList());
      if (problem) ctx.addIssue({ code: "custom", message: problem });
    }),
  keys: z.object({
    p256dh: z.string().regex(/^[A-Za-z0-9_-]{80,100}$/, "p256dh must be a base64url P-256 public key."),
    auth: z.string().regex(/^[A-Za-z0-9_-]{16,24}$/, "auth must be a base64url 16-octet secret."),
  }),
});
export const pushUnsubscribeBody = z.object({ endpoint: z.string().url() });

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

// The "You" page's form posts every field; an empty time clears quiet hours.
const hhmmOrEmpty = z.union([z.literal(""), hhmm]);
export const quietHoursForm = z
  .object({ quietFrom: hhmmOrEmpty, quietTo: hhmmOrEmpty, timezone: timeZone })
  .refine((v) => (v.quietFrom === "") === (v.quietTo === ""), { message: "Give both ends, or clear both.", path: ["quietTo"] });

export const settleBody = z.object({ note: longText("The note", { max: 500 }).optional() }).default({});
export const alertListQuery = z.object({ state: z.enum(["open", "all"]).default("open") });
