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

// Heat and ammonia harm people as well as worms in a closed room (common practice; the cautions in
// the README). Said wherever such an alert is said: its card, its push, its e-mail and the digest.
const AIR_THE_ROOM = "If the bin is in a closed room, air the room before you work there.";
const CLOSED_ROOM = `${AIR_THE_ROOM} Do not rely on this alert for anyone's safety.`;
/** The same caution under the ammonia chart, which is not an alert. */
export const AMMONIA_CHART_CAUTION = `${AIR_THE_ROOM} Do not rely on this chart for anyone's safety.`;
const CAUTIONS: Partial<Record<AlertKind, string>> = { heat: CLOSED_ROOM, ammonia: CLOSED_ROOM };

/** The caution that goes with an alert of this kind, or null when it needs none. */
export function cautionFor(kind: AlertKind): string | null {
  return CAUTIONS[kind] ?? null;
}

/** The body of an alert's push: its message, then the caution of its kind when it has one. */
export function alertPushBody(kind: AlertKind, message: string): string {
  const caution = cautionFor(kind);
  return caution ? `${message} ${caution}` : message;
}

/** The text of an alert's e-mail: its message, the caution of its kind when it has one, and where
 * to claim it. */
export function alertMailText(kind: AlertKind, message: string, url: string): string {
  const caution = cautionFor(kind);
  return [message, ...(caution ? [caution] : []), `Open Wormward to claim it: ${url}`].join("\n\n");
}
