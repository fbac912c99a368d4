// GET /api/bins/[binId]/series through the real app: a viewer reads every zone of a demo bin with
// its logbook marks; another farm's bin is 404 even for an owner; bad queries name the field.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { signIn, type Session } from "../../helpers/app";
import { makeFarm, type TestFarm } from "./fixtures";

type Answer = {
  source: string;
  bucketSeconds: number | null;
  species: string;
  zones: { zoneId: string; kind: string; t: number[]; mean: number[] }[];
  events: { kind: string; id: string; at: string; litres: number | null }[];
};
type ErrorBody = { error: { code: string; message: string; field?: string } };

let c: pg.Client;
let owner: Session;
let viewer: Session;
let otherFarm: TestFarm;
let bin: { id: string; zones: string[] };
let wateringId: string;

beforeAll(async () => {
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  owner = await signIn("noor@alder-row.example", "alder-row-demo");
  viewer = await signIn("class5b@alder-row.example", "alder-row-demo");
  const b = await c.query(
    `select b.id, b.farm_id, array_agg(z.id order by z.position) as zones from bins b join zones z on z.bin_id = b.id where b.name = 'Greenhouse Windrow' group by b.id`,
  );
  bin = { id: b.rows[0].id, zones: b.rows[0].zones };
  // A whole-bin watering an hour ago, for the marks.
  const w = await c.query(`insert into waterings (farm_id, bin_id, at, litres) values ($1, $2, now() - interval '1 hour', 3.5) returning id`, [
    b.rows[0].farm_id,
    bin.id,
  ]);
  wateringId = w.rows[0].id;
  otherFarm = await makeFarm(c, { zones: ["working"] });
});

afterAll(async () => {
  await c.query(`delete from waterings where id = $1`, [wateringId]);
  await c.end();
});

describe("the bin series API", () => {
  it("a viewer reads one line per zone of the bin for the last 24 hours, with the bin's marks", async () => {
    const res = await viewer.fetch(`/api/bins/${bin.id}/series?metric=temperature`);
    expect(res.status).toBe(200);
    const a = (await res.json()) as Answer;
    expect(a).toMatchObject({ source: "raw", bucketSeconds: 300, species: "perionyx-excavatus" });
    expect(a.zones.map((z) => z.zoneId)).toEqual(bin.zones);
    expect(a.zones.map((z) => z.kind)).toEqual(["fresh", "working", "curing"]);
    // The demo seed writes one reading per 5 minutes over the last day: one point per bucket.
    for (const z of a.zones) {
      expect(z.t.length).toBeGreaterThan(250);
      expect(z.t.length).toBeLessThanOrEqual(289);
    }
    expect(a.events).toContainEqual(expect.objectContaining({ kind: "watering", id: wateringId, litres: 3.5 }));
  });

  it("a year of moisture comes from the rollups in day buckets", async () => {
    const to = new Date();
    const from = new Date(to.getTime() - 365 * 86_400_000);
    const res = await viewer.fetch(`/api/bins/${bin.id}/series?metric=moisture&from=${from.toISOString()}&to=${to.toISOString()}`);
    expect(res.status).toBe(200);
    const a = (await res.json()) as Answer;
    expect(a).toMatchObject({ source: "rollup", bucketSeconds: 86_400 });
    expect(a.zones).toHaveLength(3);
    for (const z of a.zones) expect(z.t.length).toBeLessThanOrEqual(367);
  });

  it("another farm's bin gets 404, even for an owner", async () => {
    const res = await owner.fetch(`/api/bins/${otherFarm.binId}/series?metric=temperature`);
    expect(res.status).toBe(404);
    expect(((await res.json()) as ErrorBody).error.code).toBe("not_found");
    expect((await owner.fetch(`/api/bins/not-a-bin/series?metric=temperature`)).status).toBe(404);
  });

  it("a bad query gets 422 naming the field at fault", async () => {
    const cases: [string, string][] = [
      ["", "metric"],
      ["metric=weight", "metric"],
      ["metric=temperature&from=last-week", "from"],
      ["metric=temperature&from=2023-01-01T00:00:00Z&to=2025-01-01T00:00:00Z", "from"],
    ];
    for (const [query, field] of cases) {
      const res = await viewer.fetch(`/api/bins/${bin.id}/series?${query}`);
      expect(res.status, query).toBe(422);
      expect(((await res.json()) as ErrorBody).error).toMatchObject({ code: "invalid", field });
    }
  });

  it("signed out gets 401", async () => {
    const res = await fetch(`${inject("appUrl")}/api/bins/${bin.id}/series?metric=temperature`);
    expect(res.status).toBe(401);
  });
});
