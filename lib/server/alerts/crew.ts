// What the crew does with an alert: read it with its history, claim it ("I'm on it"), release a
// claim, settle it by hand. The caller has been authorized for the alert's farm; these decide what a lost race means.
import { claimAlert, getAlert, getAlertRow, releaseClaim, settleAlert } from "@/db/queries/alerts";
import type { Who } from "@/lib/server/auth/authorize";
import { AppError } from "@/lib/domain/errors";

const ALREADY_SETTLED = "This alert has already settled.";

export async function readAlert(_who: Who, alertId: string) {
  const alert = await getAlert(alertId);
  if (!alert) throw new AppError("not_found", "Not found.");
  return alert;
}

export async function claimAlertAs(who: Pick<Who, "userId">, alertId: string) {
  const r = await claimAlert(alertId, who.userId);
  if (r.claimed) return r.claimed;
  if (r.state === "claimed") throw new AppError("conflict", `Already claimed by ${r.claimedByName ?? "someone"}.`);
  throw new AppError("conflict", ALREADY_SETTLED);
}

export async function settleAlertAs(who: Pick<Who, "userId">, alertId: string, note?: string) {
  const settled = await settleAlert(alertId, who.userId, note);
  if (!settled) throw new AppError("conflict", ALREADY_SETTLED);
  return settled;
}

// Any keeper or owner may hand a claim back (the one who claimed went home, say); the event names who did.
export async function releaseAlertAs(who: Pick<Who, "userId">, alertId: string) {
  const released = await releaseClaim(alertId, who.userId);
  if (released) return released;
  const now = await getAlertRow(alertId);
  throw new AppError("conflict", now?.state === "settled" ? ALREADY_SETTLED : "Nobody has claimed this alert, so there is no claim to release.");
}
