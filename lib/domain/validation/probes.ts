import { z } from "zod";
import { plainText } from "./fields";

export const PROBE_METRICS = ["temperature", "moisture", "moisture-raw", "ammonia", "battery-voltage", "battery-level", "signal"] as const;

const label = plainText("The label", { max: 80 }).nullable().optional();

export const probeCreate = z.object({
  // The probe's MQTT user name and topic segment: RFC 8428 §4.5.1 name characters, no ":" or "/".
  code: z
    .string()
    .trim()
    .regex(/^[A-Za-z0-9][A-Za-z0-9._-]{1,39}$/, "Use 2–40 letters, digits, dots, dashes or underscores, starting with a letter or digit."),
  zoneId: z.string().uuid("Choose a zone.").nullable().optional(),
  label,
  metrics: z.array(z.enum(PROBE_METRICS)).min(1, "A probe measures at least one thing.").default(["temperature", "moisture"]),
  reportIntervalS: z.number().int().min(10, "Report at most every 10 s.").max(86_400, "Report at least once a day.").default(60),
});

export const probeUpdate = z.object({
  zoneId: z.string().uuid().nullable().optional(),
  label,
  metrics: z.array(z.enum(PROBE_METRICS)).min(1).optional(),
  reportIntervalS: z.number().int().min(10).max(86_400).optional(),
  archived: z.boolean().optional(),
});
export type ProbeCreate = z.output<typeof probeCreate>;
export type ProbeUpdate = z.output<typeof probeUpdate>;
