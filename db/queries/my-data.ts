// Everything of one person and of the farms they own, for "download my data". Secrets (password
// hash, token hashes, push keys) stay out.
import { and, eq, inArray, sql } from "drizzle-orm";
import { db } from "@/db";
import * as s from "@/db/schema";

const omit = <T extends Record<string, unknown>, K extends keyof T>(rows: T[], ...keys: K[]) =>
  rows.map((r) => Object.fromEntries(Object.entries(r).filter(([k]) => !keys.includes(k as K))) as Omit<T, K>);

/** For each zone with readings, the months (farm-local) that hold them, each as a readings-export link. */
async function readingsDownloads(farmId: string, timezone: string, zones: { id: string }[]) {
  if (zones.length === 0) return [];
  // The first and last hour per zone from the hourly rollups (one row per hour, not per reading).
  const r = await db().execute<{ zone_id: string; first: string; last: string }>(sql`
    select p.zone_id, to_char(min(r.hour) at time zone ${timezone}, 'YYYY-MM') as first, to_char(max(r.hour) at time zone ${timezone}, 'YYYY-MM') as last
    from reading_rollups r join probes p on p.id = r.probe_id
    where p.farm_id = ${farmId} and p.zone_id is not null
    group by p.zone_id`);
  const out: { zoneId: string; month: string; csv: string; senml: string }[] = [];
  for (const row of r.rows) {
    let [y, m] = row.first.split("-").map(Number) as [number, number];
    const [ly, lm] = row.last.split("-").map(Number) as [number, number];
    while (y < ly || (y === ly && m <= lm)) {
      const month = `${y}-${String(m).padStart(2, "0")}`;
      const last = new Date(Date.UTC(y, m, 0)).getUTCDate();
      const q = `zoneId=${row.zone_id}&from=${month}-01&to=${month}-${String(last).padStart(2, "0")}`;
      const base = `/api/farms/${farmId}/readings/export?${q}`;
      out.push({ zoneId: row.zone_id, month, csv: `${base}&format=csv`, senml: `${base}&format=senml` });
      [y, m] = m === 12 ? [y + 1, 1] : [y, m + 1];
    }
  }
  return out;
}

async function farmData(farmId: string) {
  const d = db();
  const [farm] = await d.select().from(s.farms).where(eq(s.farms.id, farmId));
  const bins = await d.select().from(s.bins).where(eq(s.bins.farmId, farmId));
  const binIds = bins.map((b) => b.id);
  const zones = binIds.length ? await d.select().from(s.zones).where(inArray(s.zones.binId, binIds)) : [];
  const probes = await d.select().from(s.probes).where(eq(s.probes.farmId, farmId));
  const probeIds = probes.map((p) => p.id);
  const alerts = await d.select().from(s.alerts).where(eq(s.alerts.farmId, farmId));
  const alertIds = alerts.map((a) => a.id);
  const feedings = await d.select().from(s.feedings).where(eq(s.feedings.farmId, farmId));
  const feedingIds = feedings.map((f) => f.id);
  return {
    farm,
    members: await d
      .select({ userId: s.users.id, name: s.users.name, email: s.users.email, role: s.memberships.role, since: s.memberships.createdAt })
      .from(s.memberships)
      .innerJoin(s.users, eq(s.users.id, s.memberships.userId))
      .where(eq(s.memberships.farmId, farmId)),
    invitations: omit(await d.select().from(s.invitations).where(eq(s.invitations.farmId, farmId)), "tokenHash"),
    bins,
    zones,
    probes: omit(probes, "tokenHash"),
    rules: await d.select().from(s.rules).where(eq(s.rules.farmId, farmId)),
    alerts,
    alertEvents: alertIds.length ? await d.select().from(s.alertEvents).where(inArray(s.alertEvents.alertId, alertIds)) : [],
    ingredients: await d.select().from(s.ingredients).where(eq(s.ingredients.farmId, farmId)),
    feedings,
    feedingItems: feedingIds.length ? await d.select().from(s.feedingItems).where(inArray(s.feedingItems.feedingId, feedingIds)) : [],
    waterings: await d.select().from(s.waterings).where(eq(s.waterings.farmId, farmId)),
    harvests: await d.select().from(s.harvests).where(eq(s.harvests.farmId, farmId)),
    notes: await d.select().from(s.logNotes).where(eq(s.logNotes.farmId, farmId)),
    ovenDrySamples: await d.select().from(s.ovenDrySamples).where(eq(s.ovenDrySamples.farmId, farmId)),
    imports: await d.select().from(s.imports).where(eq(s.imports.farmId, farmId)),
    refusedMessages: await d.select().from(s.rejectedMessages).where(eq(s.rejectedMessages.farmId, farmId)),
    // Raw readings run to millions of rows after a few months (a 96 MB answer for the demo's half
    // year), so they come as files from the readings export, one link per zone and month.
    readingsDownloads: await readingsDownloads(farmId, farm?.timezone ?? "UTC", zones),
    hourlyRollups: probeIds.length ? await d.select().from(s.readingRollups).where(inArray(s.readingRollups.probeId, probeIds)) : [],
  };
}

export async function collectMyData(userId: string) {
  const d = db();
  const [user] = await d.select().from(s.users).where(eq(s.users.id, userId));
  if (!user) return null;
  const memberships = await d
    .select({ farmId: s.farms.id, farm: s.farms.name, role: s.memberships.role, since: s.memberships.createdAt })
    .from(s.memberships)
    .innerJoin(s.farms, eq(s.farms.id, s.memberships.farmId))
    .where(eq(s.memberships.userId, userId));
  const phones = await d
    .select({ id: s.pushSubscriptions.id, device: s.pushSubscriptions.userAgent, createdAt: s.pushSubscriptions.createdAt })
    .from(s.pushSubscriptions)
    .where(eq(s.pushSubscriptions.userId, userId));
  const owned = await d
    .select({ farmId: s.memberships.farmId })
    .from(s.memberships)
    .where(and(eq(s.memberships.userId, userId), eq(s.memberships.role, "owner")));
  const [you] = omit([user], "passwordHash");
  return { you, memberships, phonesForAlerts: phones, farmsYouOwn: await Promise.all(owned.map((o) => farmData(o.farmId))) };
}
