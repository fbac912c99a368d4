// Shared set-up of the outbox tests: a keeper on a test probe's farm, optionally with phones, and an
// open act-now alert on the probe's zone, raised straight into the alerts table.
import { db } from "@/db";
import { raiseAlert } from "@/db/queries/alerts";
import { savePushSubscription } from "@/db/queries/push";
import { memberships, users, type AlertKind } from "@/db/schema";
import type { TestSubscriber } from "../../helpers/push";
import type { TestProbe } from "../ingest/helpers";

export async function addKeeper(probe: TestProbe, email: string, name = "Keeper", phones: TestSubscriber[] = []) {
  const [u] = await db().insert(users).values({ email, name, passwordHash: "x" }).returning();
  await db().insert(memberships).values({ userId: u!.id, farmId: probe.farmId, role: "keeper" });
  for (const s of phones) await savePushSubscription(u!.id, { endpoint: s.json.endpoint, p256dh: s.json.keys.p256dh, auth: s.json.keys.auth });
  return u!.id;
}

/** An open alert of `kind` on the probe's zone, raised straight into the table (nothing queued). */
export async function raiseOn(probe: TestProbe, kind: AlertKind, level: "heads_up" | "act_now", value: number, message: string, at = new Date()) {
  const binId = ((await db().execute(`select bin_id as "binId" from zones where id = '${probe.zoneId}'`)).rows[0] as { binId: string }).binId;
  const alert = await raiseAlert(
    { farmId: probe.farmId, binId, zoneId: probe.zoneId, probeId: null, subject: `zone:${probe.zoneId}:${kind}`, kind, level, value, message, details: {} },
    at,
  );
  return alert!;
}

export function raiseActNow(probe: TestProbe, kind: AlertKind, value: number, unit: string) {
  return raiseOn(probe, kind, "act_now", value, `Test bin: ${value} ${unit}`);
}
