import type { Alert } from "@/db/schema";

// Our words for alert kinds and levels, shared by screens, pushes and mail.
export const KIND_WORDS: Record<Alert["kind"], string> = {
  heat: "Heat",
  chill: "Chill",
  drying: "Drying",
  soggy: "Soggy",
  ammonia: "Ammonia",
  silent_probe: "Silent probe",
  probe_fault: "Probe fault",
};
export const LEVEL_WORDS: Record<Alert["level"], string> = { heads_up: "Heads-up", act_now: "Act now" };
