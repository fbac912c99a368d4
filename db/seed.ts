// Demo scenario (invented for the demo only): Alder Row, a small worm farm with four bins of
// different styles and species, a keeper, an owner and a viewer.
import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import { sql } from "drizzle-orm";
import type { Db } from "./index";
import { bins, farms, ingredients, memberships, probes, readings, users, zones, type BinStyle, type ZoneKind } from "./schema";
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

// Seeds the demo farm with a day of history so charts are not empty before the probes report.
export async function seedDemo(d: Db, opts: { probesFile?: string; historyHours?: number } = {}) {
  await seedIngredients(d);
  const passwordHash = await hashPassword(DEMO_PASSWORD);
  const demoProbes: DemoProbe[] = [];
  await d.transaction(async (tx) => {
    const [farm] = await tx.insert(farms).values({ name: "Alder Row Worm Farm", timezone: "Europe/Dublin" }).returning();
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
          lastSeenAt: new Date(),
          batteryV: 3.9,
          signalDbm: -67,
          firmware: "ww-0.4.2",
        });
        demoProbes.push({ code, token, bin: b.name, zone: kind, metrics });
      }
    }
  });
  await seedHistory(d, demoProbes, opts.historyHours ?? 24);
  if (opts.probesFile) {
    fs.mkdirSync(path.dirname(opts.probesFile), { recursive: true });
    fs.writeFileSync(opts.probesFile, JSON.stringify(demoProbes, null, 2), { mode: 0o600 });
  }
  return demoProbes;
}

// A plausible day: a daily swing, the fresh zone a little warmer, slow drying toward the curing end.
async function seedHistory(d: Db, demoProbes: DemoProbe[], hours: number) {
  const ids = await d.select({ id: probes.id, code: probes.code }).from(probes);
  const idOf = new Map(ids.map((r) => [r.code, r.id]));
  const now = Math.floor(Date.now() / 300_000) * 300_000;
  const rows: (typeof readings.$inferInsert)[] = [];
  for (const [i, p] of demoProbes.entries()) {
    const probeId = idOf.get(p.code)!;
    const base = p.zone === "fresh" ? 23 : p.zone === "working" ? 21.5 : 20;
    const wet = p.zone === "fresh" ? 82 : p.zone === "working" ? 78 : 72;
    for (let t = now - hours * 3600_000; t <= now; t += 300_000) {
      const dayPhase = (2 * Math.PI * ((t / 3600_000) % 24)) / 24;
      const wobble = Math.sin(t / 900_000 + i) * 0.15;
      rows.push({ probeId, metric: "temperature", ts: new Date(t), value: +(base + 1.2 * Math.sin(dayPhase - 2) + wobble).toFixed(2) });
      rows.push({ probeId, metric: "moisture", ts: new Date(t), value: +(wet - ((now - t) / 3600_000) * -0.02 + wobble).toFixed(2) });
      if (p.metrics.includes("ammonia")) rows.push({ probeId, metric: "ammonia", ts: new Date(t), value: +(2 + Math.abs(wobble) * 4).toFixed(2) });
    }
  }
  for (let i = 0; i < rows.length; i += 2000)
    await d
      .insert(readings)
      .values(rows.slice(i, i + 2000))
      .onConflictDoNothing();
  // Hourly rollups for the seeded history, cut in UTC like the ingest writer's.
  await d.execute(sql`
    insert into reading_rollups (probe_id, metric, hour, min, max, sum, count)
    select probe_id, metric, date_trunc('hour', ts, 'UTC'), min(value), max(value), sum(value), count(*)
    from readings group by 1, 2, 3
    on conflict do nothing`);
}
