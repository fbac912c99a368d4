import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { signIn, type Session } from "../../helpers/app";
import { ingredients as library } from "@/lib/domain/ingredients";

let db: pg.Client;
let owner: Session;
let farmId: string;

beforeAll(async () => {
  db = new pg.Client({ connectionString: inject("appDbUrl") });
  await db.connect();
  owner = await signIn("noor@alder-row.example", "alder-row-demo");
  farmId = (await db.query(`select id from farms where name = 'Alder Row Worm Farm'`)).rows[0].id;
});
afterAll(async () => {
  await db?.end();
});

describe("the ingredient library", () => {
  it("lists every published row with its source", async () => {
    const res = await owner.fetch(`/api/farms/${farmId}/ingredients`);
    expect(res.status).toBe(200);
    const { ingredients } = (await res.json()) as { ingredients: { key: string; source: string; farmId: string | null }[] };
    const shared = ingredients.filter((i) => i.farmId === null);
    expect(shared.map((i) => i.key).sort()).toEqual(library.map((i) => i.key).sort());
    for (const i of shared) expect(i.source.trim(), i.key).not.toBe("");
  });

  it("a farm's own ingredient is seen by that farm only", async () => {
    const name = `Brewery grain ${Date.now()}`;
    const res = await owner.fetch(`/api/farms/${farmId}/ingredients`, {
      method: "POST",
      json: { name, kind: "feedstock", moisturePct: 78, nitrogenPct: 4, cn: 12, source: "supplier sheet" },
    });
    expect(res.status).toBe(201);
    const own = ((await res.json()) as { ingredient: { carbonPct: number | null; cn: number } }).ingredient;
    expect(own.cn).toBe(12);
    const again = await owner.fetch(`/api/farms/${farmId}/ingredients`, {
      method: "POST",
      json: { name, kind: "feedstock", moisturePct: 78, nitrogenPct: 4, cn: 12, source: "supplier sheet" },
    });
    expect(again.status).toBe(409);
    const other = await db.query(`insert into farms (name) values ('Elsewhere') returning id`);
    const rows = await db.query(`select farm_id from ingredients where name = $1`, [name]);
    expect(rows.rows.map((r) => r.farm_id)).toEqual([farmId]);
    expect(rows.rows.map((r) => r.farm_id)).not.toContain(other.rows[0].id);
    // Through the API: the same person's other farm does not list it.
    const mine = await owner.fetch(`/api/farms`, { method: "POST", json: { name: "Zz second farm" } });
    const second = ((await mine.json()) as { farm: { id: string } }).farm.id;
    const listed = ((await (await owner.fetch(`/api/farms/${second}/ingredients`)).json()) as { ingredients: { name: string }[] }).ingredients;
    expect(listed.length).toBeGreaterThan(0);
    expect(listed.map((i) => i.name)).not.toContain(name);
  });

  it("moisture over 100 % is refused with the field named", async () => {
    const res = await owner.fetch(`/api/farms/${farmId}/ingredients`, {
      method: "POST",
      json: { name: "Soup", kind: "feedstock", moisturePct: 120, source: "x" },
    });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { error: { field: string } }).error.field).toBe("moisturePct");
  });
});

describe("rule overrides per bin", () => {
  it("an owner's override changes what applies to that bin only, and a reset brings the default back", async () => {
    const binRes = await owner.fetch(`/api/farms/${farmId}/bins`);
    const { bins } = (await binRes.json()) as { bins: { id: string; name: string }[] };
    const [a, b] = bins;
    const put = await owner.fetch(`/api/bins/${a!.id}/rules`, { method: "PUT", json: { kind: "heat", thresholds: { actNowAtC: 27.5 } } });
    expect(put.status).toBe(200);
    const eff = async (id: string) =>
      ((await (await owner.fetch(`/api/bins/${id}/rules`)).json()) as { effective: { heat: { t: { actNowAtC: number } } } }).effective.heat.t.actNowAtC;
    expect(await eff(a!.id)).toBe(27.5);
    expect(await eff(b!.id)).not.toBe(27.5);
    const bad = await owner.fetch(`/api/bins/${a!.id}/rules`, { method: "PUT", json: { kind: "heat", thresholds: { raiseMinutes: -5 } } });
    expect(bad.status).toBe(422);
    expect(((await bad.json()) as { error: { field: string } }).error.field).toBe("thresholds.raiseMinutes");
    await owner.fetch(`/api/bins/${a!.id}/rules?kind=heat`, { method: "DELETE" });
    expect(await eff(a!.id)).not.toBe(27.5);
  });
});
