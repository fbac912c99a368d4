// Who hears about an alert, and how: push to the crew's phones (heads-ups wait out a person's
// quiet hours; act now never does), e-mail when none of a person's phones took the push, and the
// 15-minute reminder of an unclaimed act-now alert to every keeper plus the owners' mail.
// Nothing is sent here: each send is a row in the delivery outbox (db/queries/deliveries.ts) that
// the delivery workers (ingest/delivery-worker.ts) take, so the rule runner never waits on a
// push service.
import createDebug from "debug";
import { alertContext, getAlertRow, listHeldDeliveries, takeHeldDelivery } from "@/db/queries/alerts";
import { enqueueDeliveries, type NewDelivery } from "@/db/queries/deliveries";
import { listCrew, listPushSubscriptions } from "@/db/queries/push";
import type { Alert } from "@/db/schema";
import { appMailer } from "@/lib/server/mail/app-mailer";
import { env } from "@/lib/server/env";
import { pushConfigured } from "./deliver";
import { inQuietHours } from "../../domain/quiet-hours";
import { zoneInBin } from "../../domain/zone-words";
import { KIND_WORDS, LEVEL_WORDS, alertMailText, alertPushBody } from "../../domain/alert-words";

export { KIND_WORDS, LEVEL_WORDS };

const log = createDebug("wormward:notify");

export type NotifyReason = "raised" | "escalated" | "reminder";
type Reason = NotifyReason | "after quiet hours";
export type MailContent = { subject: string; text: string };

async function messageOf(alert: Alert, reason: Reason) {
  const ctx = await alertContext(alert.id);
  const where = !ctx ? "" : ctx.zoneKind ? zoneInBin(ctx.binName, { kind: ctx.zoneKind, name: ctx.zoneName }) : ctx.binName;
  const title = `${reason === "reminder" ? "Still unclaimed · " : ""}${LEVEL_WORDS[alert.level]}: ${KIND_WORDS[alert.kind]}${where ? ` · ${where}` : ""}`;
  // The alert's own page: its words, the chart around it, its events, and claim or settle.
  const path = `/farms/${alert.farmId}/alerts/${alert.id}`;
  const url = `${env().APP_URL}${path}`;
  const payload = {
    alertId: alert.id,
    kind: alert.kind,
    level: alert.level,
    title,
    // The message was worded in the farm's units when last evaluated (lib/domain/rules/words.ts).
    body: alertPushBody(alert.kind, alert.message),
    bin: ctx?.binName ?? null,
    zone: ctx?.zoneKind ?? null,
    value: alert.value,
    details: alert.details,
    url: path,
  };
  const text = alertMailText(alert.kind, alert.message, url);
  return { payload, mail: { subject: `[Wormward] ${title}`, text } satisfies MailContent };
}

// The e-mail row for a person; its key is shared with the fallback the worker adds when all of
// that person's pushes failed, so a person gets one mail per notification either way.
export function mailDelivery(alert: Pick<Alert, "id" | "farmId">, reason: string, userId: string, mail: MailContent, key = ""): NewDelivery {
  return {
    dedupeKey: `${alert.id}:${reason}${key}:email:${userId}`,
    farmId: alert.farmId,
    alertId: alert.id,
    userId,
    channel: "email",
    reason,
    payload: { mail },
  };
}

async function deliveriesFor(alert: Alert, reason: Reason, people: { id: string; role: string }[], key = "") {
  const { payload, mail } = await messageOf(alert, reason);
  const subs = pushConfigured() ? await listPushSubscriptions(people.map((p) => p.id)) : [];
  const mailOn = appMailer() !== null;
  const rows: NewDelivery[] = subs.map((s) => ({
    dedupeKey: `${alert.id}:${reason}${key}:push:${s.id}`,
    farmId: alert.farmId,
    alertId: alert.id,
    userId: s.userId,
    subscriptionId: s.id,
    channel: "push",
    reason,
    // The worker mails this person under this key if none of their pushes gets through.
    payload: { push: payload, ...(mailOn ? { mail, mailKey: mailDelivery(alert, reason, s.userId, mail, key).dedupeKey } : {}) },
  }));
  const withPhone = new Set(subs.map((s) => s.userId));
  // Mail at once: whoever has no phone for alerts; on a reminder, the owners as well.
  const mailNow = mailOn ? people.filter((p) => !withPhone.has(p.id) || (reason === "reminder" && p.role === "owner")) : [];
  for (const p of mailNow) rows.push(mailDelivery(alert, reason, p.id, mail, key));
  return { rows, pushes: subs.length, mails: mailNow.length };
}

// `recovering`: queued by the sweep for a raise or escalation whose process died before queueing it;
// taken only if no other node has queued it since `alert` was read.
export async function notifyAlert(alert: Alert, reason: NotifyReason, now = new Date(), opts: { recovering?: boolean } = {}) {
  const crew = await listCrew(alert.farmId);
  const awake = crew.filter((p) => alert.level === "act_now" || !inQuietHours(now, p.quietFrom, p.quietTo, p.timezone));
  const held = crew.filter((p) => !awake.includes(p));
  const targets = reason === "reminder" ? crew.filter((p) => p.role === "keeper" || p.role === "owner") : awake;
  const { rows, pushes, mails } = await deliveriesFor(alert, reason, targets);
  const events = held.map((p) => ({ alertId: alert.id, at: now, type: "held", userId: p.id, channel: "push", detail: { reason: "quiet hours" } }));
  const added = await enqueueDeliveries(rows, events, {
    alertId: alert.id,
    at: now,
    ...(opts.recovering ? { unlessSentSince: { lastSentAt: alert.lastSentAt } } : {}),
  });
  if (added === null) return { queued: 0, mailed: 0, held: 0 };
  log("alert %s %s: %d push(es) and %d mail(s) queued, %d held", alert.id, reason, pushes, mails, held.length);
  return { queued: pushes, mailed: mails, held: held.length };
}

// A heads-up held back by quiet hours goes out when they end, if nobody has claimed or settled it.
export async function deliverHeldAlerts(now = new Date()) {
  const held = await listHeldDeliveries();
  if (held.length === 0) return 0;
  const crew = new Map<string, Awaited<ReturnType<typeof listCrew>>[number]>();
  let delivered = 0;
  for (const h of held) {
    const alert = await getAlertRow(h.alertId);
    if (!alert) continue;
    if (!crew.has(`${alert.farmId}:${h.userId}`)) for (const p of await listCrew(alert.farmId)) crew.set(`${alert.farmId}:${p.id}`, p);
    const person = crew.get(`${alert.farmId}:${h.userId}`);
    if (!person || inQuietHours(now, person.quietFrom, person.quietTo, person.timezone)) continue;
    if (!(await takeHeldDelivery(h.id, now))) continue;
    const { rows } = await deliveriesFor(alert, "after quiet hours", [person], `:${h.id}`);
    await enqueueDeliveries(rows);
    delivered += 1;
  }
  if (delivered) log("queued %d heads-up(s) held by quiet hours", delivered);
  return delivered;
}
