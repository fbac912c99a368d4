// Who may change a bin's cycle, through the built app and the real database: owners and keepers set
// a bin's feeding interval and planned harvest (PATCH /api/bins/[binId]); a keeper naming any other
// field, and a viewer, get 403 and change nothing; bad values are a 422 naming the field in plain
// words; only an owner changes the farm's own interval (PATCH /api/farms/[farmId]).
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { crewFarm, newBin, type Crew } from "../logbook/helpers";

type ErrorBody = { error: { code: string; message: string; field?: string } };

let crew: Crew;
let binId: string;
let otherBinId: string;
let otherFarmId: string;

const patchBin = (who: Crew["owner"], id: string, json: unknown) => who.fetch(`/api/bins/${id}`, { method: "PATCH", json });
const stored = async () =>
  (await crew.db.query(`select name, feeding_interval_days as days, planned_harvest_on::text as planned from bins where id = $1`, [binId])).rows[0] as {
    name: string;
    days: number | null;
    planned: string | null;
  };

async function refused(res: Response, status: number, field?: string) {
  const text = await res.text();
  expect(res.status, text).toBe(status);
  const body = JSON.parse(text) as ErrorBody;
  if (field) expect(body.error.field).toBe(field);
  // The API puts the field's name before the sentence ("feedingIntervalDays: …"); the sentence is what a person reads.
  return body.error.message.replace(/^\w+: /, "");
}

beforeAll(async () => {
  crew = await crewFarm("Zz Cycle Edits Farm");
  binId = (await newBin(crew.owner, crew.farmId)).id;
  // A farm none of the crew belongs to.
  const otherFarm = (await crew.db.query(`insert into farms (name) values ('Zz Cycle Edits Other Farm') returning id`)).rows[0].id;
  otherFarmId = otherFarm;
  otherBinId = (
    await crew.db.query(`insert into bins (farm_id, name, style, species) values ($1, 'Not yours', 'windrow', 'eisenia-fetida') returning id`, [otherFarm])
  ).rows[0].id;
});
afterAll(async () => {
  if (otherFarmId) await crew.db.query(`delete from farms where id = $1`, [otherFarmId]);
  await crew?.close();
});

describe("a bin's feeding interval and planned harvest", () => {
  it("a keeper sets both, and null gives the bin back the farm's interval and no plan", async () => {
    const res = await patchBin(crew.keeper, binId, { feedingIntervalDays: 14, plannedHarvestOn: "2027-01-20" });
    expect(res.status, await res.clone().text()).toBe(200);
    expect(((await res.json()) as { bin: { feedingIntervalDays: number } }).bin.feedingIntervalDays).toBe(14);
    expect(await stored()).toMatchObject({ days: 14, planned: "2027-01-20" });
    expect((await patchBin(crew.owner, binId, { feedingIntervalDays: null, plannedHarvestOn: null })).status).toBe(200);
    expect(await stored()).toMatchObject({ days: null, planned: null });
  });

  it("a viewer gets 403 and nothing changes", async () => {
    await refused(await patchBin(crew.viewer, binId, { feedingIntervalDays: 7 }), 403);
    expect((await stored()).days).toBeNull();
  });

  it("a keeper naming any other field gets 403, and the cycle field sent with it is not kept either", async () => {
    const before = await stored();
    const said = await refused(await patchBin(crew.keeper, binId, { name: "renamed by keeper", feedingIntervalDays: 9 }), 403);
    expect(said).toBe("A keeper can change only a bin's feeding interval and planned harvest; ask an owner of the farm.");
    expect(await stored()).toEqual(before);
  });

  it("another farm's bin answers 404, even to an owner", async () => {
    await refused(await patchBin(crew.owner, otherBinId, { feedingIntervalDays: 7 }), 404);
    const [b] = (await crew.db.query(`select feeding_interval_days from bins where id = $1`, [otherBinId])).rows;
    expect(b.feeding_interval_days).toBeNull();
  });

  it("bad values are refused in plain words naming the field", async () => {
    expect(await refused(await patchBin(crew.keeper, binId, { feedingIntervalDays: 0 }), 422, "feedingIntervalDays")).toBe(
      "The feeding interval must be at least 1 day.",
    );
    expect(await refused(await patchBin(crew.keeper, binId, { feedingIntervalDays: 2.5 }), 422, "feedingIntervalDays")).toBe(
      "The feeding interval must be a whole number of days.",
    );
    expect(await refused(await patchBin(crew.keeper, binId, { feedingIntervalDays: 400 }), 422, "feedingIntervalDays")).toBe(
      "The feeding interval must be at most 180 days.",
    );
    expect(await refused(await patchBin(crew.keeper, binId, { plannedHarvestOn: "2027-02-30" }), 422, "plannedHarvestOn")).toBe(
      "The planned harvest must be a date, like 2026-12-05.",
    );
    expect(await refused(await patchBin(crew.keeper, binId, { plannedHarvestOn: "2099-01-01" }), 422, "plannedHarvestOn")).toBe(
      "The planned harvest must be within five years from now.",
    );
    expect(await stored()).toMatchObject({ days: null, planned: null });
  });
});

describe("the farm's feeding interval", () => {
  const patchFarm = (who: Crew["owner"], json: unknown) => who.fetch(`/api/farms/${crew.farmId}`, { method: "PATCH", json });
  const farmDays = async () => (await crew.db.query(`select feeding_interval_days as d from farms where id = $1`, [crew.farmId])).rows[0].d as number;

  it("an owner changes it; a keeper and a viewer get 403", async () => {
    expect((await patchFarm(crew.owner, { feedingIntervalDays: 28 })).status).toBe(200);
    expect(await farmDays()).toBe(28);
    await refused(await patchFarm(crew.keeper, { feedingIntervalDays: 7 }), 403);
    await refused(await patchFarm(crew.viewer, { feedingIntervalDays: 7 }), 403);
    expect(await farmDays()).toBe(28);
  });

  it("is refused as a number of days that is not whole, and cannot be emptied", async () => {
    expect(await refused(await patchFarm(crew.owner, { feedingIntervalDays: 1.5 }), 422, "feedingIntervalDays")).toBe(
      "The feeding interval must be a whole number of days.",
    );
    await refused(await patchFarm(crew.owner, { feedingIntervalDays: null }), 422, "feedingIntervalDays");
    expect(await farmDays()).toBe(28);
  });
});
