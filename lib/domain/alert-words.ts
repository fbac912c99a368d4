import type { AlertKind, AlertLevel } from "@/lib/domain/vocabulary";

// Our words for alert kinds and levels, shared by screens, pushes and mail.
export const KIND_WORDS: Record<AlertKind, string> = {
  heat: "Heat",
  chill: "Chill",
  drying: "Drying",
  soggy: "Soggy",
  ammonia: "Ammonia",
  silent_probe: "Silent probe",
  probe_fault: "Probe fault",
};
export const LEVEL_WORDS: Record<AlertLevel, string> = { heads_up: "Heads-up", act_now: "Act now" };
