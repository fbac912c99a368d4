// Demo scenario (invented for the demo only): Alder Row, a small worm farm with four bins of
// different styles and species, a keeper, an owner and a viewer.
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { asc, eq, inArray, isNull, sql } from "drizzle-orm";
import type pg from "pg";
import { from as copyFrom } from "pg-copy-streams";
import { buildDemoHistory, countReadings, readingLines, rollupLines, STEP_MS, type DemoHistory, type HistoryInput } from "./demo-history";
import type { Db } from "./index";
import {
  alertEvents,
  alerts,
  bins,
  farms,
  feedingItems,
  feedings,
  harvests,
  ingredients,
  logNotes,
  memberships,
  probes,
  readingRollups,
  readings,
  shifts,
  users,
  waterings,
  zones,
  type BinStyle,
  type ZoneKind,
} from "./schema";
import { ingredients as library } from "@/lib/domain/ingredients";
import { hashPassword } from "@/lib/server/auth/password";
import { hashToken } from "@/lib/server/auth/tokens";

export const DEMO_PASSWORD = "alder-row-demo";
export const DEMO_PEOPLE = [
  { email: "noor@alder-row.example", name: "Noor Halvorsen", role: "owner" },
  { email: "tomas@alder-row.example", name: "Tomás Reyes", role: "keeper" },
  { email: "class5b@alder-row.example", name: "Class 5B (Linden School)", role: "viewer" },
] as const;

type DemoBin = { name: string; style: BinStyle; species: string; size: [number, number, number]; zones: ZoneKind[]; notes: string };
const DEMO_BINS: DemoBin[] = [
  {
    name: "Long Bed North",
    style: "flow-through",
    species: "eisenia-fetida",
    size: [240, 90, 60],
    zones: ["fresh", "working", "curing"],
    notes: "Fed from the north end; mesh floor, harvest bar at the south end.",
  },
  { name: "Shed Tote", style: "tote", species: "eisenia-hortensis", size: [60, 40, 35], zones: ["working"], notes: "Kept for bait worms." },
  {
    name: "Tray Tower",
    style: "tray stack",
    species: "eudrilus-eugeniae",
    size: [50, 50, 80],
    zones: ["fresh", "working", "curing"],
    notes: "Top tray fed; needs the heater below 15 °C.",
  },
  {
    name: "Greenhouse Windrow",
    style: "windrow",
    species: "perionyx-excavatus",
    size: [600, 120, 45],
    zones: ["fresh", "working", "curing"],
    notes: "Under shade cloth from May to September.",
  },
];

export type DemoProbe = { code: string; token: string; bin: string; zone: ZoneKind; metrics: string[] };

// The shared ingredient library (farmId null), each row with its published source.
export async function seedIngredients(d: Db) {
  await d
    .insert(ingredients)
    .values(
      library.map((i) => ({
        key: i.key,
        name: i.name,
        kind: i.kind,
        moisturePct: i.moisturePct,
        carbonPct: i.carbonPct,
        nitrogenPct: i.nitrogenPct,
        cn: i.cn,
        source: i.source,
        sourceStatus: i.sourceStatus,
        note: i.note ?? null,
      })),
    )
    // A database seeded before takes the library's current values, sources and notes: the row (and
    // its id, which old feedings name) stays. A row with no published value keeps its place with null
    // values and status "gap", which the feeding form does not offer.
    .onConflictDoUpdate({
      target: [ingredients.farmId, ingredients.key],
      set: {
        name: sql`excluded.name`,
        kind: sql`excluded.kind`,
        moisturePct: sql`excluded.moisture_pct`,
        carbonPct: sql`excluded.carbon_pct`,
        nitrogenPct: sql`excluded.nitrogen_pct`,
        cn: sql`excluded.cn`,
        source: sql`excluded.source`,
        sourceStatus: sql`excluded.source_status`,
        note: sql`excluded.note`,
      },
    });
}

export async function isEmpty(d: Db) {
  const r = await d.execute(sql`select count(*)::int as n from farms`);
  return (r.rows[0] as { n: number }).n === 0;
}

export type SeedCounts = {
  readings: number;
  rollups: number;
  feedings: number;
  waterings: number;
  shifts: number;
  harvests: number;
  notes: number;
  alerts: number;
};
export type SeedOptions = {
  probesFile?: string;
  /** Days of invented history before now (default 180). */
  historyDays?: number;
  /** The end of the history (default now); rounded down to 5 minutes. */
  now?: number;
  /** The scenario's random seed: the same seed and end give the same rows. */
  seed?: number;
};

export const DEMO_HISTORY_DAYS = 180;
export const DEMO_SEED = 13;

/** The seed's database: Drizzle over a pool it can also take a client from for COPY. */
export type SeedDb = Db & { $client: pg.Pool };

// Seeds the demo farm with half a year of invented history (db/demo-history.ts), so charts, the
// logbook and the alert history have something to show before the probes report.
export async function seedDemo(d: SeedDb, opts: SeedOptions = {}): Promise<{ probes: DemoProbe[]; counts: SeedCounts }> {
  await seedIngredients(d);
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const demoProbes: DemoProbe[] = [];
  const endMs = Math.floor((opts.now ?? Date.now()) / STEP_MS) * STEP_MS;
  let farmId = "";
  await d.transaction(async (tx) => {
    const [farm] = await tx.insert(farms).values({ name: "Alder Row Worm Farm", timezone: "Europe/Dublin" }).returning();
    farmId = farm!.id;
    for (const p of DEMO_PEOPLE) {
      const [u] = await tx.insert(users).values({ email: p.email, name: p.name, passwordHash, timezone: "Europe/Dublin" }).returning();
      await tx.insert(memberships).values({ userId: u!.id, farmId: farm!.id, role: p.role });
    }
    let n = 0;
    for (const b of DEMO_BINS) {
      const [bin] = await tx
        .insert(bins)
        .values({
          farmId: farm!.id,
          name: b.name,
          style: b.style,
          species: b.species,
          lengthCm: b.size[0],
          widthCm: b.size[1],
          depthCm: b.size[2],
          notes: b.notes,
        })
        .returning();
      for (const [i, kind] of b.zones.entries()) {
        const [zone] = await tx
          .insert(zones)
          .values({ binId: bin!.id, position: i + 1, kind })
          .returning();
        n += 1;
        const code = `alder-${String(n).padStart(2, "0")}`;
        const token = randomBytes(18).toString("base64url");
        const metrics = ["temperature", "moisture", "battery-voltage", "signal", ...(b.style === "flow-through" && kind === "fresh" ? ["ammonia"] : [])];
        await tx.insert(probes).values({
          farmId: farm!.id,
          zoneId: zone!.id,
          code,
          label: `${b.name} · ${kind}`,
          tokenHash: hashToken(token),
          metrics,
          lastSeenAt: new Date(endMs),
          batteryV: 3.9,
          signalDbm: -67,
          firmware: "ww-0.4.2",
        });
        demoProbes.push({ code, token, bin: b.name, zone: kind, metrics });
      }
    }
  });
  // A seed that fails half-way takes the demo farm back out, so the next start seeds it again.
  let historyInput: HistoryInput | null = null;
  let history: DemoHistory;
  let counts: SeedCounts;
  try {
    historyInput = await loadHistoryInput(d, farmId, endMs, { days: opts.historyDays, seed: opts.seed });
    history = buildDemoHistory(historyInput);
    counts = await writeHistory(d, history);
  } catch (err) {
    const ids = (await d.select({ id: probes.id }).from(probes).where(eq(probes.farmId, farmId))).map((p) => p.id);
    await d.delete(readings).where(inArray(readings.probeId, ids));
    await d.delete(readingRollups).where(inArray(readingRollups.probeId, ids));
    await d.delete(farms).where(eq(farms.id, farmId));
    await d.delete(users).where(
      inArray(
        users.email,
        DEMO_PEOPLE.map((p) => p.email),
      ),
    );
    throw err;
  }
  // Each probe's row says what it last sent; the probes file gives the fleet where each zone stands.
  for (const hb of historyInput.bins)
    for (const p of hb.probes) {
      const last = history.last.get(p.id);
      if (last) await d.update(probes).set({ batteryV: last.batteryV, signalDbm: last.signalDbm }).where(eq(probes.id, p.id));
    }
  if (opts.probesFile) {
    const lastOf = new Map(historyInput.bins.flatMap((hb) => hb.probes.map((p) => [p.code, history.last.get(p.id)] as const)));
    const withLast = demoProbes.map((p) => {
      const l = lastOf.get(p.code);
      return l ? { ...p, last: { temperature: l.temperature, moisture: l.moisture } } : p;
    });
    fs.mkdirSync(path.dirname(opts.probesFile), { recursive: true });
    fs.writeFileSync(opts.probesFile, JSON.stringify(withLast, null, 2), { mode: 0o600 });
  }
  return { probes: demoProbes, counts };
}

/** What the demo scenario needs of the seeded farm, read back from its rows: the seed and a test
 * rebuilding the same history both start from here. */
export async function loadHistoryInput(d: Db, farmId: string, endMs: number, opts: { days?: number; seed?: number } = {}): Promise<HistoryInput> {
  const binRows = await d.select().from(bins).where(eq(bins.farmId, farmId));
  const zoneRows = await d
    .select()
    .from(zones)
    .where(
      inArray(
        zones.binId,
        binRows.map((b) => b.id),
      ),
    )
    .orderBy(asc(zones.position));
  const probeRows = await d.select().from(probes).where(eq(probes.farmId, farmId)).orderBy(asc(probes.id));
  const team = await d.select().from(memberships).where(eq(memberships.farmId, farmId));
  const library = await d.select({ id: ingredients.id, key: ingredients.key }).from(ingredients).where(isNull(ingredients.farmId));
  const order = (name: string) => DEMO_BINS.findIndex((b) => b.name === name);
  return {
    endMs,
    days: opts.days ?? DEMO_HISTORY_DAYS,
    seed: opts.seed ?? DEMO_SEED,
    timeZone: "Europe/Dublin",
    farmId,
    keeperId: team.find((m) => m.role === "keeper")!.userId,
    ownerId: team.find((m) => m.role === "owner")!.userId,
    ingredientIds: new Map(library.map((r) => [r.key, r.id])),
    bins: binRows
      .sort((a, b) => order(a.name) - order(b.name))
      .map((b) => ({
        id: b.id,
        name: b.name,
        style: b.style,
        species: b.species,
        lengthCm: b.lengthCm ?? 0,
        widthCm: b.widthCm ?? 0,
        zones: zoneRows.filter((z) => z.binId === b.id).map((z) => ({ id: z.id, kind: z.kind, position: z.position })),
        probes: probeRows
          .filter((p) => zoneRows.some((z) => z.id === p.zoneId && z.binId === b.id))
          .map((p) => ({ id: p.id, code: p.code, zoneId: p.zoneId!, metrics: p.metrics })),
      })),
  };
}

/** Passes COPY chunks through, counting their lines. */
function* counted(chunks: Iterable<string>, box: { n: number }) {
  for (const c of chunks) {
    for (let i = c.indexOf("\n"); i !== -1; i = c.indexOf("\n", i + 1)) box.n += 1;
    yield c;
  }
}

// COPY FROM STDIN through pg-copy-streams (Drizzle has no words for COPY), on a client of its own.
async function copyInto(pool: pg.Pool, statement: string, chunks: Iterable<string>) {
  const client = await pool.connect();
  try {
    await pipeline(Readable.from(chunks), client.query(copyFrom(statement)));
  } finally {
    client.release();
  }
}

// COPY for the readings and their rollups (about a million rows: row-by-row inserts would take
// minutes), in two halves and the rollups at once, so both cores work; the logbook and alerts are a
// few hundred rows and go in as ordinary inserts.
async function writeHistory(d: SeedDb, h: DemoHistory): Promise<SeedCounts> {
  const rollups = { n: 0 };
  const total = h.series.reduce((n, s) => n + s.values.length, 0);
  let acc = 0;
  const cut = h.series.findIndex((s) => (acc += s.values.length) >= total / 2) + 1;
  const readingsCopy = "copy readings (probe_id, metric, ts, value) from stdin";
  await Promise.all([
    copyInto(d.$client, readingsCopy, readingLines(h.series.slice(0, cut))),
    copyInto(d.$client, readingsCopy, readingLines(h.series.slice(cut))),
    copyInto(d.$client, "copy reading_rollups (probe_id, metric, hour, min, max, sum, count) from stdin", counted(rollupLines(h.series), rollups)),
  ]);
  await d.transaction(async (tx) => {
    for (const f of h.feedings) {
      const { items, ...feeding } = f;
      const [row] = await tx.insert(feedings).values(feeding).returning({ id: feedings.id });
      await tx.insert(feedingItems).values(items.map((i) => ({ ...i, feedingId: row!.id })));
    }
    if (h.waterings.length) await tx.insert(waterings).values(h.waterings);
    if (h.shifts.length) await tx.insert(shifts).values(h.shifts);
    if (h.harvests.length) await tx.insert(harvests).values(h.harvests);
    if (h.notes.length) await tx.insert(logNotes).values(h.notes);
    for (const a of h.alerts) {
      const { events, ...alert } = a;
      const [row] = await tx.insert(alerts).values(alert).returning({ id: alerts.id });
      await tx.insert(alertEvents).values(events.map((e) => ({ ...e, alertId: row!.id })));
    }
  });
  // Fresh statistics, so the first chart's query plans over the new rows at once.
  await d.execute(sql`analyze readings, reading_rollups`);
  return {
    readings: countReadings(h.series),
    rollups: rollups.n,
    feedings: h.feedings.length,
    waterings: h.waterings.length,
    shifts: h.shifts.length,
    harvests: h.harvests.length,
    notes: h.notes.length,
    alerts: h.alerts.length,
  };
}
