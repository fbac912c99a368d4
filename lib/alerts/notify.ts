// Who hears about an alert, and how: push to the crew's phones (heads-ups wait out a person's
// quiet hours; act now never does), e-mail when a person has no phone that took the push, and
// the 15-minute reminder of an unclaimed act-now alert to every keeper plus the owners' mail.
import createDebug from "debug";
import { alertContext, getAlertRow, listHeldDeliveries, markAlertSent, recordAlertEvents, takeHeldDelivery } from "@/db/queries/alerts";
import { listCrew } from "@/db/queries/push";
import type { Alert } from "@/db/schema";
import { env } from "@/lib/env";
import { makeMailer, type Mailer } from "@/lib/mail";
import { pushToUsers } from "./deliver";
import { inQuietHours } from "./quiet-hours";
import { KIND_WORDS, LEVEL_WORDS } from "./words";

export { KIND_WORDS, LEVEL_WORDS };

const log = createDebug("wormward:notify");


let mailer: Mailer | null | undefined;
function getMailer(): Mailer | null {
  if (mailer !== undefined) return mailer;
  const e = env();
  mailer = e.SMTP_PORT ? makeMailer({ host: e.SMTP_HOST, port: e.SMTP_PORT, from: e.MAIL_FROM }) : null;
  return mailer;
}

export type NotifyReason = "raised" | "escalated" | "reminder";

async function messageOf(alert: Alert, reason: NotifyReason | "after quiet hours") {
  const ctx = await alertContext(alert.id);
  const where = ctx ? `${ctx.binName}${ctx.zoneKind ? `, ${ctx.zoneName ?? `${ctx.zoneKind} zone`}` : ""}` : "";
  const title = `${reason === "reminder" ? "Still unclaimed · " : ""}${LEVEL_WORDS[alert.level]}: ${KIND_WORDS[alert.kind]}${where ? ` · ${where}` : ""}`;
  const url = `${env().APP_URL}/farms/${alert.farmId}#alert-${alert.id}`;
  const payload = {
    alertId: alert.id,
    kind: alert.kind,
    level: alert.level,
    title,
    body: alert.message,
    bin: ctx?.binName ?? null,
    zone: ctx?.zoneKind ?? null,
    value: alert.value,
    details: alert.details,
    url: `/farms/${alert.farmId}#alert-${alert.id}`,
  };
  const text = `${alert.message}\n\nOpen Wormward to claim it: ${url}\n\nAmmonia and heat can harm worms quickly and, in a closed room, people too: ventilate before you work in the bin.`;
  return { title, payload, text };
}

export async function notifyAlert(alert: Alert, reason: NotifyReason, now = new Date()) {
  const { title, payload, text } = await messageOf(alert, reason);
  const crew = await listCrew(alert.farmId);
  const awake = crew.filter((p) => alert.level === "act_now" || !inQuietHours(now, p.quietFrom, p.quietTo, p.timezone));
  const held = crew.filter((p) => !awake.includes(p));
  const targets = reason === "reminder" ? crew.filter((p) => p.role === "keeper" || p.role === "owner") : awake;

  const outcomes = await pushToUsers(targets.map((p) => p.id), payload);
  const reached = new Set(outcomes.filter((o) => o.ok).map((o) => o.userId));
  const events: Parameters<typeof recordAlertEvents>[0] = outcomes.map((o) => ({
    alertId: alert.id,
    at: now,
    type: o.ok ? "sent" : "send_failed",
    userId: o.userId,
    channel: "push",
    detail: { reason, status: o.status, removed: o.removed, ...(o.message ? { message: o.message } : {}) },
  }));
  for (const p of held) events.push({ alertId: alert.id, at: now, type: "held", userId: p.id, channel: "push", detail: { reason: "quiet hours" } });

  // Mail: everyone the push did not reach; on a reminder, the owners as well.
  const mailTo = targets.filter((p) => !reached.has(p.id) || (reason === "reminder" && p.role === "owner"));
  const m = getMailer();
  if (m && mailTo.length) {
    await Promise.all(
      mailTo.map(async (p) => {
        try {
          await m.send({ to: p.email, subject: `[Wormward] ${title}`, text });
          events.push({ alertId: alert.id, at: now, type: "sent", userId: p.id, channel: "email", detail: { reason } });
        } catch (e) {
          log("mail to user %s failed: %s", p.id, (e as Error).message);
          events.push({ alertId: alert.id, at: now, type: "send_failed", userId: p.id, channel: "email", detail: { reason, message: (e as Error).message } });
        }
      }),
    );
  }
  await recordAlertEvents(events);
  await markAlertSent(alert.id, now);
  log("alert %s %s: push %d/%d, mail %d, held %d", alert.id, reason, reached.size, targets.length, mailTo.length, held.length);
  return { pushed: reached.size, mailed: mailTo.length, held: held.length };
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
    const { title, payload, text } = await messageOf(alert, "after quiet hours");
    const outcomes = await pushToUsers([person.id], payload);
    const events: Parameters<typeof recordAlertEvents>[0] = outcomes.map((o) => ({
      alertId: alert.id, at: now, type: o.ok ? "sent" : "send_failed", userId: person.id, channel: "push",
      detail: { reason: "after quiet hours", status: o.status, removed: o.removed },
    }));
    const m = getMailer();
    if (!outcomes.some((o) => o.ok) && m) {
      try {
        await m.send({ to: person.email, subject: `[Wormward] ${title}`, text });
        events.push({ alertId: alert.id, at: now, type: "sent", userId: person.id, channel: "email", detail: { reason: "after quiet hours" } });
      } catch (e) {
        log("mail to user %s failed: %s", person.id, (e as Error).message);
      }
    }
    await recordAlertEvents(events);
    delivered += 1;
  }
  if (delivered) log("delivered %d heads-up(s) held by quiet hours", delivered);
  return delivered;
}
