// The daily digest against the real database and the fake mailbox: the previous farm-local day per
// bin (bin names, alert counts, temperature and moisture ranges from the rollups, feedings), sent
// from 07:00 farm time to owners and keepers, once even when two schedulers run at the same moment.
import { randomBytes } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { db } from "@/db";
import { insertFeeding } from "@/db/queries/feedings";
import { insertReadings, type ReadingInput } from "@/db/queries/readings";
import { alerts, bins, farms, memberships, probes, users, zones } from "@/db/schema";
import { createDigestScheduler, sendDueDigests, type DigestScheduler } from "@/ingest/digest";
import { makeMailer } from "@/lib/server/mail/mail";
import { cautionFor } from "@/lib/domain/alert-words";
import { freePort } from "../../setup/global";

process.env.SMTP_PORT = String(inject("smtpPort"));

type Mail = { to: string[]; subject: string; text: string; html: string | null };
async function mailTo(address: string): Promise<Mail[]> {
  const r = await fetch(`${inject("mailboxUrl")}/messages`);
  return ((await r.json()) as Mail[]).filter((m) => m.to.includes(address));
}

const tag = randomBytes(4).toString("hex");
const people = { owner: `digest-owner-${tag}@example.org`, keeper: `digest-keeper-${tag}@example.org`, viewer: `digest-viewer-${tag}@example.org` };
let farmId: string;
let schedulers: DigestScheduler[] = [];
// Europe/Dublin keeps Irish Standard Time (UTC+1) in July, so 14 July there is 13 Jul 23:00Z to 14 Jul 23:00Z.
const at = (iso: string) => new Date(iso);

beforeAll(async () => {
  const d = db();
  const [farm] = await d
    .insert(farms)
    .values({ name: `Digest farm ${tag}`, timezone: "Europe/Dublin" })
    .returning();
  farmId = farm!.id;
  const ids: Record<string, string> = {};
  for (const [role, email] of Object.entries(people)) {
    const [u] = await d
      .insert(users)
      .values({ email, name: `The ${role}`, passwordHash: "x" })
      .returning();
    await d.insert(memberships).values({ userId: u!.id, farmId, role: role as "owner" | "keeper" | "viewer" });
    ids[role] = u!.id;
  }
  const [bed] = await d.insert(bins).values({ farmId, name: "Long Bed East", style: "bed", species: "eisenia-fetida" }).returning();
  const [tote] = await d.insert(bins).values({ farmId, name: "Kitchen Tote", style: "tote", species: "eisenia-fetida" }).returning();
  const [fresh] = await d.insert(zones).values({ binId: bed!.id, position: 1, kind: "fresh" }).returning();
  const [curing] = await d.insert(zones).values({ binId: bed!.id, position: 2, kind: "curing" }).returning();
  await d.insert(zones).values({ binId: tote!.id, position: 1, kind: "working" });
  const probe = async (zoneId: string, n: number) =>
    (
      await d
        .insert(probes)
        .values({ farmId, zoneId, code: `dg${tag}-${n}`, tokenHash: `h${tag}${n}` })
        .returning()
    )[0]!.id;
  const pFresh = await probe(fresh!.id, 1);
  const pCuring = await probe(curing!.id, 2);

  const r = (probeId: number, metric: ReadingInput["metric"], iso: string, value: number): ReadingInput => ({ probeId, metric, ts: at(iso), value });
  // Through the writer's own insert, so the hourly rollups are the ones the ingest service makes.
  await insertReadings([
    r(pFresh, "temperature", "2026-07-13T22:30:00Z", 35), // 13 July local: not this digest's day
    r(pFresh, "temperature", "2026-07-13T23:30:00Z", 21),
    r(pFresh, "temperature", "2026-07-14T12:00:00Z", 27.5),
    r(pFresh, "temperature", "2026-07-14T22:30:00Z", 23),
    r(pFresh, "temperature", "2026-07-14T23:10:00Z", 10), // 15 July local
    r(pFresh, "moisture", "2026-07-14T06:00:00Z", 78),
    r(pFresh, "moisture", "2026-07-14T18:00:00Z", 82.4),
    r(pCuring, "temperature", "2026-07-14T09:00:00Z", 19),
    r(pCuring, "temperature", "2026-07-14T09:30:00Z", 20.5),
  ]);

  const alert = (binId: string, zoneId: string | null, kind: "heat" | "drying" | "chill", level: "heads_up" | "act_now", raised: string, settled?: string) =>
    d.insert(alerts).values({
      farmId,
      binId,
      zoneId,
      kind,
      level,
      subject: `digest:${tag}:${kind}:${raised}`,
      message: "test",
      raisedAt: at(raised),
      ...(settled ? { state: "settled" as const, settledAt: at(settled) } : {}),
    });
  await alert(bed!.id, fresh!.id, "heat", "act_now", "2026-07-14T10:00:00Z");
  await alert(bed!.id, fresh!.id, "drying", "heads_up", "2026-07-14T15:00:00Z", "2026-07-14T18:00:00Z");
  await alert(bed!.id, curing!.id, "chill", "heads_up", "2026-07-12T03:00:00Z", "2026-07-14T08:00:00Z"); // settled today only
  await alert(tote!.id, null, "heat", "heads_up", "2026-07-13T12:00:00Z"); // 13 July local

  const feeding = (iso: string, kg: number) =>
    insertFeeding({
      farmId,
      binId: bed!.id,
      zoneId: fresh!.id,
      at: at(iso),
      byUserId: ids.keeper!,
      notes: null,
      mixMoisturePct: null,
      mixCn: null,
      totalKg: kg,
      items: [{ ingredientId: null, name: "vegetable scraps", massKg: kg, moisturePct: 87, carbonPct: null, nitrogenPct: null }],
    });
  await feeding("2026-07-14T08:00:00Z", 5);
  await feeding("2026-07-14T17:00:00Z", 7.5);
  await feeding("2026-07-13T17:00:00Z", 40); // 13 July local
});

afterAll(async () => {
  await Promise.all(schedulers.map((s) => s.stop()));
});

describe("the daily digest", () => {
  it("waits for 07:00 farm time", async () => {
    // 05:59Z is 06:59 in Dublin in July.
    expect(await sendDueDigests(at("2026-07-15T05:59:00Z"), { farmIds: [farmId] })).toEqual([]);
    const [f] = await db().select({ sentOn: farms.digestSentOn }).from(farms).where(eq(farms.id, farmId));
    expect(f!.sentOn).toBeNull();
    expect(await mailTo(people.owner)).toEqual([]);
  });

  it("is sent once to each owner and keeper even when two schedulers run at the same moment", async () => {
    const now = () => at("2026-07-15T06:05:00Z");
    schedulers = [0, 1].map(() => createDigestScheduler({ now, farmIds: [farmId], everyMs: 3_600_000 }));
    const runs = (await Promise.all(schedulers.map((s) => s.tick()))).flat();
    expect(runs).toEqual([{ farmId, day: "2026-07-14", sent: 2, failed: 0 }]);
    // And again, from both, later that morning: nothing more.
    expect((await Promise.all(schedulers.map((s) => s.tick()))).flat()).toEqual([]);
    expect(await sendDueDigests(at("2026-07-15T20:00:00Z"), { farmIds: [farmId] })).toEqual([]);

    expect(await mailTo(people.owner)).toHaveLength(1);
    expect(await mailTo(people.keeper)).toHaveLength(1);
    expect(await mailTo(people.viewer)).toHaveLength(0);
    const [f] = await db().select({ sentOn: farms.digestSentOn }).from(farms).where(eq(farms.id, farmId));
    expect(f!.sentOn).toBe("2026-07-15");
  });

  it("names every bin with the day's alert counts, zone ranges and feedings", async () => {
    const [mail] = await mailTo(people.keeper);
    expect(mail!.subject).toBe(`[Wormward] Digest farm ${tag}: your day, Tuesday 14 July 2026`);
    const lines = mail!.text.split("\n").map((l) => l.trim());
    const bed = lines.indexOf("Long Bed East");
    const tote = lines.indexOf("Kitchen Tote");
    expect(bed).toBeGreaterThan(-1);
    expect(tote).toBeGreaterThan(-1);
    // Bins in name order: Kitchen Tote, then Long Bed East.
    expect(lines.slice(tote, tote + 5)).toEqual([
      "Kitchen Tote",
      "Alerts: none",
      "Working zone: no readings",
      "Feedings: none logged",
      "No feeding logged yet (fed every 21 days).",
    ]);
    // Last fed 18:00 on 14 July (Dublin), the farm's 21 days: due 4 August, 20 days after the morning of 15 July.
    expect(lines.slice(bed, bed + 7)).toEqual([
      "Long Bed East",
      "Alerts: 2 raised (1 act now heat, 1 heads-up drying), 2 settled",
      cautionFor("heat"),
      "Fresh zone: temperature 21.0–27.5 °C, moisture 78–82 %",
      "Curing zone: temperature 19.0–20.5 °C",
      "Feedings: 2 logged, 12.5 kg in all",
      "Next feeding due 4 Aug, in 20 days (last fed 14 Jul, every 21 days).",
    ]);
    expect(mail!.text).toContain(`/farms/${farmId}`);
    expect(mail!.html).toContain("<h2");
    expect(mail!.html).toContain("Long Bed East");
    expect(mail!.html).toContain("21.0–27.5 °C");
  });

  it("goes out again the next morning, for the next day", async () => {
    const runs = await sendDueDigests(at("2026-07-16T06:01:00Z"), { farmIds: [farmId] });
    expect(runs).toEqual([{ farmId, day: "2026-07-15", sent: 2, failed: 0 }]);
    const mails = await mailTo(people.owner);
    expect(mails).toHaveLength(2);
    // On 15 July local only the 23:10Z reading of 14 July (00:10 on the 15th) falls in the day.
    expect(mails[1]!.text).toContain("Fresh zone: temperature 10.0 °C");
  });

  it("a day whose mail could not be delivered to anyone is tried again on the next tick", async () => {
    // Nothing listens on this port: every send fails.
    const dead = makeMailer({ host: "127.0.0.1", port: await freePort(), from: "Wormward <digest@wormward.invalid>" });
    const failed = await sendDueDigests(at("2026-07-17T06:30:00Z"), { farmIds: [farmId], mailer: dead });
    dead.close();
    expect(failed).toEqual([{ farmId, day: "2026-07-16", sent: 0, failed: 2 }]);
    const [f] = await db().select({ sentOn: farms.digestSentOn }).from(farms).where(eq(farms.id, farmId));
    expect(f!.sentOn).toBe("2026-07-16");
    expect(await sendDueDigests(at("2026-07-17T06:31:00Z"), { farmIds: [farmId] })).toEqual([{ farmId, day: "2026-07-16", sent: 2, failed: 0 }]);
    expect(await mailTo(people.keeper)).toHaveLength(3);
  });
});
