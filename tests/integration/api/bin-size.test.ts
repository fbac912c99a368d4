// Issue 13: a bin's size is asked when it is made and can be changed later, in the farm's units
// (stored cm); only owners change it. And re-seeding the library refreshes its values, so a database
// seeded before gives fruit waste and mixed paper all three values and stops offering peat moss.
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db";
import { seedIngredients } from "@/db/seed";
import { ingredients as library } from "@/lib/domain/ingredients";
import { isOffered } from "@/lib/domain/ingredients";
import { crewFarm, json, type Crew } from "../logbook/helpers";

type Bin = { id: string; lengthCm: number | null; widthCm: number | null; depthCm: number | null };
type ErrorBody = { error: { code: string; field?: string; message: string } };

let crew: Crew;
beforeAll(async () => {
  crew = await crewFarm("Zz Bin Size Farm");
});
afterAll(async () => {
  await crew?.close();
  await closeDb();
});

const add = (json: Record<string, unknown>) =>
  crew.owner.fetch(`/api/farms/${crew.farmId}/bins`, {
    method: "POST",
    json: { name: `Size ${Math.random().toString(36).slice(2, 7)}`, style: "tote", species: "eisenia-fetida", zoneCount: 1, ...json },
  });

describe("a bin's size", () => {
  it("is stored in cm when the bin is made, and changed later by PATCH", async () => {
    const res = await add({ lengthCm: 80, widthCm: 50, depthCm: 30 });
    expect(res.status).toBe(201);
    const bin = (await json<{ bin: Bin }>(res)).bin;
    expect(bin).toMatchObject({ lengthCm: 80, widthCm: 50, depthCm: 30 });
    const patched = await crew.owner.fetch(`/api/bins/${bin.id}`, { method: "PATCH", json: { lengthCm: 120, widthCm: 60 } });
    expect(patched.status).toBe(200);
    expect((await json<{ bin: Bin }>(patched)).bin).toMatchObject({ lengthCm: 120, widthCm: 60, depthCm: 30 });
    // null clears a length the keeper no longer trusts
    const cleared = await crew.owner.fetch(`/api/bins/${bin.id}`, { method: "PATCH", json: { depthCm: null } });
    expect((await json<{ bin: Bin }>(cleared)).bin).toMatchObject({ lengthCm: 120, depthCm: null });
  });

  it("keepers and viewers cannot change it", async () => {
    const bin = (await json<{ bin: Bin }>(await add({ lengthCm: 60, widthCm: 40 }))).bin;
    for (const who of [crew.keeper, crew.viewer]) {
      const res = await who.fetch(`/api/bins/${bin.id}`, { method: "PATCH", json: { lengthCm: 10 } });
      expect(res.status).toBe(403);
    }
    const row = await crew.db.query(`select length_cm from bins where id = $1`, [bin.id]);
    expect(row.rows[0].length_cm).toBe(60);
  });

  it("a bad size is refused naming the field, in the farm's units", async () => {
    const tiny = await add({ lengthCm: 0.5, widthCm: 40 });
    expect(tiny.status).toBe(422);
    const small = (await json<ErrorBody>(tiny)).error;
    expect(small.field).toBe("lengthCm");
    expect(small.message).toContain("Length is too small to be measured; the smallest is 1 cm.");
    await crew.db.query(`update farms set unit_system = 'imperial' where id = $1`, [crew.farmId]);
    try {
      const huge = await add({ lengthCm: 60, widthCm: 100_001 });
      expect(huge.status).toBe(422);
      // 100 000 cm = 39 370 in, said rounded inward (lib/domain/validation/fields.ts)
      const big = (await json<ErrorBody>(huge)).error;
      expect(big.field).toBe("widthCm");
      expect(big.message).toContain("Width cannot be over 39300 in.");
    } finally {
      await crew.db.query(`update farms set unit_system = 'metric' where id = $1`, [crew.farmId]);
    }
  });
});

describe("re-seeding the ingredient library", () => {
  it("refreshes the values of rows seeded before, keeping their ids", async () => {
    // this worker's own database (tests/setup/worker-db.ts), so the app's library is untouched
    await seedIngredients(db());
    const before = await db().execute(sql`select id, key from ingredients where farm_id is null and key in ('peat-moss', 'fruit-waste')`);
    // as an older seed left them: peat moss with a C:N only, fruit waste without nitrogen or carbon
    await db().execute(sql`update ingredients set cn = 58, source_status = 'M', source = 'common practice' where key = 'peat-moss' and farm_id is null`);
    await db().execute(sql`update ingredients set nitrogen_pct = null, carbon_pct = null where key = 'fruit-waste' and farm_id is null`);
    await seedIngredients(db());
    const rows = (await db().execute(sql`select * from ingredients where farm_id is null`)).rows as Record<string, unknown>[];
    const by = new Map(rows.map((r) => [r.key as string, r]));
    for (const r of before.rows as { id: string; key: string }[]) expect(by.get(r.key)!.id).toBe(r.id);
    for (const i of library) {
      const r = by.get(i.key)!;
      expect([r.moisture_pct, r.carbon_pct, r.nitrogen_pct, r.cn, r.source, r.source_status], i.key).toEqual([
        i.moisturePct,
        i.carbonPct,
        i.nitrogenPct,
        i.cn,
        i.source,
        i.sourceStatus,
      ]);
      const row = {
        farmId: null,
        sourceStatus: r.source_status as string,
        moisturePct: r.moisture_pct as number | null,
        carbonPct: r.carbon_pct as number | null,
        nitrogenPct: r.nitrogen_pct as number | null,
        cn: r.cn as number | null,
      };
      if (i.kind !== "water") expect(isOffered(row), i.key).toBe(!i.excluded);
    }
  });
});
