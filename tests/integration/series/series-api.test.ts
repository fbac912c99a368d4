// GET /api/zones/[zoneId]/series and /api/probes/[probeId]/series through the real app.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { signIn, type Session } from "../../helpers/app";
import { addMember, makeFarm, type TestFarm } from "./fixtures";

type Answer = { source: string; bucketSeconds: number | null; from: string; to: string; series: { code: string; t: number[]; mean: number[] }[] };
type ErrorBody = { error: { code: string; message: string; field?: string } };

let c: pg.Client;
let owner: Session;
let viewer: Session;
let otherFarm: TestFarm;
let ownFarm: TestFarm;
let ownOwner: Session;
let demoZone: string;
let demoProbe: { id: number; code: string };

beforeAll(async () => {
  c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  owner = await signIn("noor@alder-row.example", "alder-row-demo");
  viewer = await signIn("class5b@alder-row.example", "alder-row-demo");
  const p = await c.query(`select id, code, zone_id from probes where code = 'alder-02'`);
  demoProbe = { id: p.rows[0].id, code: p.rows[0].code };
  demoZone = p.rows[0].zone_id;
  otherFarm = await makeFarm(c, { zones: ["working"] });
  // 90 days of hourly readings for another farm's probe, written like the ingest writes them.
  await c.query(
    `insert into readings (probe_id, metric, ts, value)
     select $1, 'temperature', g, 20 from generate_series(now() - interval '90 days', now(), interval '1 hour') g`,
    [otherFarm.probes[0]!.id],
  );
  // A farm of this file's own with 100 days of moisture at one reading per 10 minutes, and rollups.
  ownFarm = await makeFarm(c, { zones: ["curing"] });
  ownOwner = await signIn(await addMember(c, ownFarm.farmId, "owner", "series-test-pass"), "series-test-pass");
  await c.query(
    `with ins as (
       insert into readings (probe_id, metric, ts, value)
       select $1, 'moisture', g, 70 + extract(hour from g)::int % 5 from generate_series(now() - interval '100 days', now(), interval '10 minutes') g
       returning probe_id, metric, ts, value)
     insert into reading_rollups (probe_id, metric, hour, min, max, sum, count)
     select probe_id, metric, date_trunc('hour', ts, 'UTC'), min(value), max(value), sum(value), count(*) from ins group by 1, 2, 3`,
    [ownFarm.probes[0]!.id],
  );
});

afterAll(async () => {
  await c.end();
});

describe("the series API", () => {
  it("a zone's last 24 hours come from raw readings by default", async () => {
    const res = await viewer.fetch(`/api/zones/${demoZone}/series?metric=temperature`);
    expect(res.status).toBe(200);
    const a = (await res.json()) as Answer;
    expect(a.source).toBe("raw");
    expect(Date.parse(a.to) - Date.parse(a.from)).toBe(86_400_000);
    expect(a.series.map((s) => s.code)).toEqual([demoProbe.code]);
    // The demo seed writes one reading per 5 minutes over the last day.
    expect(a.series[0]!.t.length).toBeGreaterThan(250);
    expect(a.series[0]!.t.length).toBeLessThanOrEqual(1000);
  });

  it("a 90-day range comes from the hourly rollups in 6-hour buckets", async () => {
    const to = new Date();
    const from = new Date(to.getTime() - 90 * 86_400_000);
    const res = await ownOwner.fetch(`/api/probes/${ownFarm.probes[0]!.id}/series?metric=moisture&from=${from.toISOString()}&to=${to.toISOString()}`);
    expect(res.status).toBe(200);
    const a = (await res.json()) as Answer;
    expect(a).toMatchObject({ source: "rollup", bucketSeconds: 21_600 });
    // 90 days of 4 buckets, plus the partial ones at either end.
    const n = a.series[0]!.t.length;
    expect(n).toBeGreaterThanOrEqual(360);
    expect(n).toBeLessThanOrEqual(362);
    for (const v of a.series[0]!.mean) {
      expect(v).toBeGreaterThanOrEqual(70);
      expect(v).toBeLessThanOrEqual(74);
    }
  });

  it("another farm's zone or probe gets 404, even for an owner", async () => {
    const zone = await owner.fetch(`/api/zones/${otherFarm.zones.working}/series?metric=temperature`);
    expect(zone.status).toBe(404);
    expect(((await zone.json()) as ErrorBody).error.code).toBe("not_found");
    const probe = await owner.fetch(`/api/probes/${otherFarm.probes[0]!.id}/series?metric=temperature`);
    expect(probe.status).toBe(404);
    for (const id of ["abc", "1.5", "99999999999"]) expect((await owner.fetch(`/api/probes/${id}/series?metric=temperature`)).status, id).toBe(404);
  });

  it("a bad query gets 422 naming the field at fault", async () => {
    const cases: [string, string][] = [
      ["", "metric"],
      ["metric=weight", "metric"],
      ["metric=temperature&from=last-week", "from"],
      ["metric=temperature&from=2025-05-02T00:00:00Z&to=2025-05-01T00:00:00Z", "from"],
    ];
    for (const [query, field] of cases) {
      const res = await viewer.fetch(`/api/zones/${demoZone}/series?${query}`);
      expect(res.status, query).toBe(422);
      expect(((await res.json()) as ErrorBody).error).toMatchObject({ code: "invalid", field });
    }
  });

  it("signed out gets 401", async () => {
    const res = await fetch(`${inject("appUrl")}/api/zones/${demoZone}/series?metric=temperature`);
    expect(res.status).toBe(401);
  });
});
