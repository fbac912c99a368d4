// A bin's cycle read from the real database: the bin page's view, Today and the digest say the next
// feeding from the last feeding and the interval (the bin's own or the farm's); the bin page tells
// the harvest side's estimate from the curing zone's feedings, shifts and moisture rollups, and the
// castings harvested per harvest and per month. The same worked example as tests/unit/bin-cycle.test.ts
// (invented, stated in full there): Dublin, fed 24 Oct into the curing zone, every 21 days, daily
// mean moisture 75.6 → 74.0 % over 1–5 Nov; on 5 Nov: due 14 Nov, dry by 28 Nov, ready 5 Dec.
import { randomBytes } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/db";
import { createBin } from "@/db/queries/bins";
import { getToday } from "@/db/queries/today";
import { bins, farms, feedings, harvests, probes, readingRollups, shifts, users } from "@/db/schema";
import { buildDigest } from "@/lib/server/alerts/digest";
import { binPageView } from "@/lib/server/bins/bin-page-view";
import type { Who } from "@/lib/server/auth/authorize";

const tag = randomBytes(4).toString("hex");
const NOW = new Date("2026-11-05T18:00:00Z");
let farmId: string;
let userId: string;
let bin: Awaited<ReturnType<typeof createBin>>;
let tote: Awaited<ReturnType<typeof createBin>>;
const zone = (kind: string) => bin.zones.find((z) => z.kind === kind)!.id;
const who = (role: Who["role"]): Who => ({ userId, farmId, role, units: "metric" });

beforeAll(async () => {
  const d = db();
  const [farm] = await d
    .insert(farms)
    .values({ name: `Cycle farm ${tag}`, timezone: "Europe/Dublin", feedingIntervalDays: 21 })
    .returning();
  farmId = farm!.id;
  const [u] = await d
    .insert(users)
    .values({ email: `cycle-${tag}@example.org`, name: "Cycle Keeper", passwordHash: "x" })
    .returning();
  userId = u!.id;
  bin = await createBin(farmId, { name: "Long Flow", style: "flow-through", species: "eisenia-fetida", zoneKinds: ["fresh", "working", "curing"] });
  tote = await createBin(farmId, { name: "Kitchen Tote", style: "tote", species: "eisenia-fetida", zoneKinds: ["working"] });
  await d.insert(feedings).values({ farmId, binId: bin.id, zoneId: zone("curing"), at: new Date("2026-10-24T09:30:00Z"), totalKg: 4 });
  const [probe] = await d
    .insert(probes)
    .values({ farmId, zoneId: zone("curing"), code: `cy${tag}`, tokenHash: `h${tag}` })
    .returning();
  // One rollup hour a day (11:00Z, so each day's mean is dated 11:30Z): 75.6, 75.2, 74.8, 74.4, 74.0 %.
  await d.insert(readingRollups).values(
    [75.6, 75.2, 74.8, 74.4, 74.0].map((pct, i) => ({
      probeId: probe!.id,
      metric: "moisture" as const,
      hour: new Date(`2026-11-0${i + 1}T11:00:00Z`),
      min: pct,
      max: pct,
      sum: pct,
      count: 1,
    })),
  );
  // Harvests: 3.2 kg in September, none in October, 2 + 1.5 kg in November.
  await d.insert(harvests).values([
    { farmId, binId: bin.id, zoneId: zone("curing"), at: new Date("2026-09-12T10:00:00Z"), massKg: 3.2 },
    { farmId, binId: bin.id, zoneId: zone("curing"), at: new Date("2026-11-01T10:00:00Z"), massKg: 2 },
    { farmId, binId: bin.id, zoneId: zone("curing"), at: new Date("2026-11-03T10:00:00Z"), massKg: 1.5 },
  ]);
});

afterAll(async () => {
  await db().delete(farms).where(eq(farms.id, farmId));
  await db().delete(users).where(eq(users.id, userId));
});

describe("the bin page's cycle", () => {
  it("says the next feeding and the harvest side's estimate with its reasoning, as worked out by hand", async () => {
    const view = (await binPageView(who("keeper"), bin.id, NOW))!;
    expect(view.cycle.today).toBe("2026-11-05");
    expect(view.cycle.interval).toEqual({ days: 21, from: "farm" });
    expect(view.cycle.feeding.words).toBe("Next feeding due 14 Nov, in 9 days (last fed 24 Oct, every 21 days).");
    expect(view.cycle.harvestSide?.zone.id).toBe(zone("curing"));
    expect(view.cycle.harvestSide?.estimate.readyOn).toBe("2026-12-05");
    expect(view.cycle.harvestSide?.estimate.lines).toEqual([
      "Curing side last fed 24 Oct; castings cure about 6 weeks (common practice) → 5 Dec.",
      "Moisture 74 %, falling 0.4 %/day, reaches 65 % about 28 Nov (harvestable below 65 %: common practice).",
      "Ready about 5 Dec.",
    ]);
    expect(view.cycle.planned).toBeNull();
  });

  it("gives castings per harvest and per month, in the farm's calendar", async () => {
    const { yields } = (await binPageView(who("viewer"), bin.id, NOW))!.cycle;
    expect(yields.perHarvest).toEqual([
      { on: "2026-09-12", massKg: expect.closeTo(3.2, 5) },
      { on: "2026-11-01", massKg: 2 },
      { on: "2026-11-03", massKg: 1.5 },
    ]);
    expect(yields.perMonth.map((m) => [m.month, Math.round(m.massKg * 10) / 10, m.count])).toEqual([
      ["2026-09", 3.2, 1],
      ["2026-10", 0, 0],
      ["2026-11", 3.5, 2],
    ]);
  });

  it("offers the bin's probes to those who log, and nothing to a viewer", async () => {
    expect((await binPageView(who("keeper"), bin.id, NOW))!.probes.map((p) => p.code)).toEqual([`cy${tag}`]);
    const seen = (await binPageView(who("viewer"), bin.id, NOW))!;
    expect(seen.canLog).toBe(false);
    expect(seen.probes).toEqual([]);
  });

  it("takes the bin's own interval over the farm's, and says the planned harvest beside the estimate", async () => {
    await db().update(bins).set({ feedingIntervalDays: 10, plannedHarvestOn: "2026-12-01" }).where(eq(bins.id, bin.id));
    try {
      const { cycle } = (await binPageView(who("keeper"), bin.id, NOW))!;
      expect(cycle.interval).toEqual({ days: 10, from: "bin" });
      expect(cycle.feeding.words).toBe("Feeding overdue by 2 days: it was due 3 Nov (last fed 24 Oct, every 10 days).");
      expect(cycle.planned?.words).toBe("Harvest planned for 1 Dec, before the estimate (5 Dec): check the curing side is dry and finished first.");
    } finally {
      await db().update(bins).set({ feedingIntervalDays: null, plannedHarvestOn: null }).where(eq(bins.id, bin.id));
    }
  });

  it("a feeding of the fresh side moves the next feeding but not the curing; a shift onto the curing side restarts it", async () => {
    const [fresh] = await db()
      .insert(feedings)
      .values({ farmId, binId: bin.id, zoneId: zone("fresh"), at: new Date("2026-11-03T10:00:00Z"), totalKg: 3 })
      .returning();
    try {
      let { cycle } = (await binPageView(who("keeper"), bin.id, NOW))!;
      expect(cycle.feeding.words).toBe("Next feeding due 24 Nov, in 19 days (last fed 3 Nov, every 21 days).");
      expect(cycle.harvestSide?.estimate.curingOn).toBe("2026-12-05");
      const [shift] = await db()
        .insert(shifts)
        .values({ farmId, binId: bin.id, zoneId: zone("working"), toZoneId: zone("curing"), at: new Date("2026-11-02T15:00:00Z") })
        .returning();
      ({ cycle } = (await binPageView(who("keeper"), bin.id, NOW))!);
      expect(cycle.harvestSide?.estimate.lines[0]).toBe(
        "Material last shifted onto the curing side 2 Nov; castings cure about 6 weeks (common practice) → 14 Dec.",
      );
      expect(cycle.harvestSide?.estimate.readyOn).toBe("2026-12-14");
      await db().delete(shifts).where(eq(shifts.id, shift!.id));
    } finally {
      await db().delete(feedings).where(eq(feedings.id, fresh!.id));
    }
  });

  it("a tote has no harvest side", async () => {
    const { cycle } = (await binPageView(who("keeper"), tote.id, NOW))!;
    expect(cycle.harvestSide).toBeNull();
    expect(cycle.feeding.words).toBe("No feeding logged yet (fed every 21 days).");
  });
});

describe("the next feeding elsewhere", () => {
  it("Today says each bin's next feeding", async () => {
    const today = await getToday(farmId, 24, NOW);
    const words = Object.fromEntries(today.bins.map((b) => [b.name, b.feeding.words]));
    expect(words).toEqual({
      "Kitchen Tote": "No feeding logged yet (fed every 21 days).",
      "Long Flow": "Next feeding due 14 Nov, in 9 days (last fed 24 Oct, every 21 days).",
    });
  });

  it("the digest of 4 Nov, read on 5 Nov, says it under each bin", async () => {
    const digest = (await buildDigest(farmId, "2026-11-04"))!;
    expect(digest.text).toContain("Long Flow\n");
    expect(digest.text).toContain("  Next feeding due 14 Nov, in 9 days (last fed 24 Oct, every 21 days).\n");
    expect(digest.text).toContain("  No feeding logged yet (fed every 21 days).\n");
  });
});
