// Oven-dry samples beside a probe, and the calibration line fitted from them.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { applyCalibration } from "@/lib/domain/calibration";
import { crewFarm, json, newBin, type Crew } from "./helpers";

type ErrorBody = { error: { code: string; field?: string; message: string } };
type Sample = { id: string; moistureWbPct: number; rawReading: number | null; tareG: number; ovenTempC: number | null; binId: string; zoneId: string };
type Cal = { slope: number; intercept: number; r2: number; fittedAt: string; points: number };

let crew: Crew;
let bin: Awaited<ReturnType<typeof newBin>>;
const probes: number[] = [];

beforeAll(async () => {
  crew = await crewFarm("Zz Oven-dry Samples Farm");
  bin = await newBin(crew.owner, crew.farmId);
});
afterAll(async () => {
  if (crew) await crew.db.query(`delete from readings where probe_id = any($1)`, [probes]);
  await crew?.close();
});

async function newProbe(zoneIndex = 1) {
  const id = (
    await crew.db.query(`insert into probes (farm_id, zone_id, code, token_hash, metrics) values ($1, $2, $3, 'x', '{moisture-raw}') returning id`, [
      crew.farmId,
      bin.zones[zoneIndex]!.id,
      `cal-${Math.random().toString(36).slice(2, 9)}`,
    ])
  ).rows[0].id as number;
  probes.push(id);
  return id;
}
const sample = (probe: number, body: Record<string, unknown>) => crew.keeper.fetch(`/api/probes/${probe}/samples`, { method: "POST", json: body });

describe("oven-dry samples", () => {
  it("stores moisture on a wet basis: 10 g wet, 2.3 g dry is 77 %", async () => {
    const probe = await newProbe();
    // Cornell "Moisture Content" (Richard & Trautmann), worked example: 10 g wet grass dried to 2.3 g → 77 % moisture.
    const res = await sample(probe, { wetMassG: 10, dryMassG: 2.3, rawReading: 455, ovenTempC: 105 });
    expect(res.status).toBe(201);
    const { sample: s } = await json<{ sample: Sample }>(res);
    expect(s.moistureWbPct).toBeCloseTo(77, 4);
    expect(s).toMatchObject({ rawReading: 455, ovenTempC: 105, binId: bin.id, zoneId: bin.zones[1]!.id });
    // The same sample weighed in its 4 g container: 14 g gross wet, 6.3 g gross dry (Cornell's figures).
    const gross = await json<{ sample: Sample }>(await sample(probe, { wetMassG: 14, dryMassG: 6.3, tareG: 4 }));
    expect(gross.sample.moistureWbPct).toBeCloseTo(77, 4);
    expect(gross.sample.tareG).toBe(4);
    const list = (await json<{ samples: Sample[] }>(await crew.viewer.fetch(`/api/probes/${probe}/samples`))).samples;
    expect(list).toHaveLength(2);
  });

  it("refuses a dry mass above the wet mass, naming the field", async () => {
    const probe = await newProbe();
    const res = await sample(probe, { wetMassG: 10, dryMassG: 12 });
    expect(res.status).toBe(422);
    expect((await json<ErrorBody>(res)).error.field).toBe("dryMassG");
    const neg = await sample(probe, { wetMassG: -3, dryMassG: 1 });
    expect(neg.status).toBe(422);
    expect((await json<ErrorBody>(neg)).error.field).toBe("wetMassG");
    expect((await crew.db.query(`select count(*)::int as n from oven_dry_samples where probe_id = $1`, [probe])).rows[0].n).toBe(0);
  });

  it("takes the probe's own moisture-raw reading nearest the sampling time, within 10 minutes", async () => {
    const probe = await newProbe();
    const at = new Date(Date.now() - 3600_000);
    const off = (min: number) => new Date(at.getTime() + min * 60_000);
    await crew.db.query(
      `insert into readings (probe_id, metric, ts, value) values ($1, 'moisture-raw', $2, 999), ($1, 'moisture-raw', $3, 430), ($1, 'moisture-raw', $4, 470), ($1, 'temperature', $5, 21)`,
      [probe, off(-12), off(-3), off(7), off(0)],
    );
    const near = await json<{ sample: Sample; rawFrom: string }>(await sample(probe, { wetMassG: 10, dryMassG: 3, at: at.toISOString() }));
    expect(near.sample.rawReading).toBe(430);
    expect(near.rawFrom).toBe("probe");
    // 20 minutes later the nearest raw reading (at +7 min) is 13 minutes away: none is taken.
    const far = await json<{ sample: Sample; rawFrom: string }>(await sample(probe, { wetMassG: 10, dryMassG: 3, at: off(20).toISOString() }));
    expect(far.sample.rawReading).toBeNull();
    expect(far.rawFrom).toBe("none");
  });
});

describe("calibration", () => {
  it("a fit from three samples recovers a constructed line, and GET returns the stored line with residuals", async () => {
    const probe = await newProbe(0);
    // a worked example of our own, recomputed independently: θ = −0.0025·raw + 1.35, i.e. moisture % = −0.25·raw + 135.
    // 100 g wet samples dried to 95, 75 and 55 g hold 5, 25 and 45 % water (wet basis).
    for (const [raw, dry] of [
      [520, 95],
      [440, 75],
      [360, 55],
    ] as const) {
      expect((await sample(probe, { wetMassG: 100, dryMassG: dry, rawReading: raw, ovenTempC: 70 })).status).toBe(201);
    }
    // A sample with no raw reading takes no part in the fit.
    expect((await sample(probe, { wetMassG: 100, dryMassG: 10, at: new Date(Date.now() - 86400_000).toISOString() })).status).toBe(201);

    expect((await crew.keeper.fetch(`/api/probes/${probe}/calibration`, { method: "POST" })).status).toBe(403);
    const res = await crew.owner.fetch(`/api/probes/${probe}/calibration`, { method: "POST" });
    expect(res.status, await res.clone().text()).toBe(200);
    const fit = await json<{ calibration: Cal; residuals: { residual: number }[] }>(res);
    expect(fit.calibration.slope).toBeCloseTo(-0.25, 9);
    expect(fit.calibration.intercept).toBeCloseTo(135, 6);
    expect(fit.calibration.r2).toBeCloseTo(1, 9);
    expect(fit.calibration.points).toBe(3);
    expect(fit.residuals).toHaveLength(3);
    for (const r of fit.residuals) expect(Math.abs(r.residual)).toBeLessThan(1e-6);

    const stored = (await crew.db.query(`select calibration from probes where id = $1`, [probe])).rows[0].calibration as Cal;
    expect(stored).toEqual(fit.calibration);
    const got = await json<{ calibration: Cal; samples: Sample[]; residuals: unknown[] }>(await crew.viewer.fetch(`/api/probes/${probe}/calibration`));
    expect(got.calibration).toEqual(fit.calibration);
    expect(got.samples).toHaveLength(4);
    expect(got.residuals).toHaveLength(3);
    // raw 450 → θ 0.225, i.e. 22.5 % on the stored line.
    expect(applyCalibration(got.calibration, 450)).toBeCloseTo(22.5, 6);

    expect((await crew.owner.fetch(`/api/probes/${probe}/calibration`, { method: "DELETE" })).status).toBe(200);
    expect((await json<{ calibration: Cal | null }>(await crew.viewer.fetch(`/api/probes/${probe}/calibration`))).calibration).toBeNull();
  });

  it("fewer than two distinct raw readings is refused with the reason, and nothing is stored", async () => {
    const probe = await newProbe();
    const none = await crew.owner.fetch(`/api/probes/${probe}/calibration`, { method: "POST" });
    expect(none.status).toBe(422);
    await sample(probe, { wetMassG: 100, dryMassG: 40, rawReading: 480 });
    await sample(probe, { wetMassG: 100, dryMassG: 30, rawReading: 480 });
    const res = await crew.owner.fetch(`/api/probes/${probe}/calibration`, { method: "POST" });
    expect(res.status).toBe(422);
    expect((await json<ErrorBody>(res)).error.message).toMatch(/two or more different raw readings/);
    expect((await crew.db.query(`select calibration from probes where id = $1`, [probe])).rows[0].calibration).toBeNull();
  });
});
