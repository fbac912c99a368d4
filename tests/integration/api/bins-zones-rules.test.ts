// The refusals a bin's zones, rules and feedings make once the input has parsed: each is decided in
// a use case (lib/server), and answers with the API's envelope, its status and the field at fault.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { crewFarm, json, newBin, type Crew } from "../logbook/helpers";

type ErrorBody = { error: { code: string; field?: string; message: string } };
type Bin = Awaited<ReturnType<typeof newBin>>;

let crew: Crew;
beforeAll(async () => {
  crew = await crewFarm("Zz Bins Zones Rules Farm");
});
afterAll(async () => {
  await crew?.close();
});

describe("zones", () => {
  it("a seventh zone is refused, naming the kind", async () => {
    const bin = await newBin(crew.owner, crew.farmId, 6);
    const res = await crew.owner.fetch(`/api/bins/${bin.id}/zones`, { method: "POST", json: { kind: "working" } });
    expect(res.status).toBe(422);
    expect((await json<ErrorBody>(res)).error).toMatchObject({ code: "invalid", field: "kind", message: "A bin has at most 6 zones." });
    const count = await crew.db.query(`select count(*)::int as n from zones where bin_id = $1`, [bin.id]);
    expect(count.rows[0].n).toBe(6);
  });

  it("an archived zone frees its place for a new one at the harvest end", async () => {
    const bin = await newBin(crew.owner, crew.farmId, 6);
    expect((await crew.owner.fetch(`/api/zones/${bin.zones[5]!.id}`, { method: "DELETE" })).status).toBe(200);
    const res = await crew.owner.fetch(`/api/bins/${bin.id}/zones`, { method: "POST", json: { kind: "curing", name: "new end" } });
    expect(res.status).toBe(201);
    expect((await json<{ zone: { position: number; name: string } }>(res)).zone).toMatchObject({ position: 7, name: "new end" });
  });

  it("moving a zone onto a position its bin already uses is a 409 naming the position", async () => {
    const bin = await newBin(crew.owner, crew.farmId, 3);
    const res = await crew.owner.fetch(`/api/zones/${bin.zones[0]!.id}`, { method: "PATCH", json: { position: 2 } });
    expect(res.status).toBe(409);
    expect((await json<ErrorBody>(res)).error).toMatchObject({ code: "conflict", field: "position" });
  });
});

describe("bins", () => {
  let bin: Bin;
  beforeAll(async () => {
    bin = await newBin(crew.owner, crew.farmId, 2);
  });
  const listed = async (query: string) =>
    (await json<{ bins: { id: string }[] }>(await crew.viewer.fetch(`/api/farms/${crew.farmId}/bins${query}`))).bins.some((b) => b.id === bin.id);

  it("an archived bin is listed only with ?archived=1, and {archived: false} brings it back with the other changes", async () => {
    expect((await crew.owner.fetch(`/api/bins/${bin.id}`, { method: "DELETE" })).status).toBe(200);
    expect(await listed("")).toBe(false);
    expect(await listed("?archived=1")).toBe(true);
    const res = await crew.owner.fetch(`/api/bins/${bin.id}`, { method: "PATCH", json: { archived: false, notes: "back in use" } });
    expect(res.status).toBe(200);
    expect((await json<{ bin: { archivedAt: string | null; notes: string } }>(res)).bin).toMatchObject({ archivedAt: null, notes: "back in use" });
    expect(await listed("")).toBe(true);
  });

  it("{archived: true} in a PATCH is ignored: archiving is DELETE", async () => {
    const res = await crew.owner.fetch(`/api/bins/${bin.id}`, { method: "PATCH", json: { archived: true } });
    expect(res.status).toBe(200);
    expect((await json<{ bin: { archivedAt: string | null } }>(res)).bin.archivedAt).toBeNull();
  });

  it("a feeding naming a zone of another bin is refused, naming the zone", async () => {
    const other = await newBin(crew.owner, crew.farmId, 1);
    const res = await crew.keeper.fetch(`/api/bins/${bin.id}/feedings`, {
      method: "POST",
      json: { zoneId: other.zones[0]!.id, items: [{ name: "coffee grounds", massKg: 1, moisturePct: 60, nitrogenPct: 2, cn: 20 }] },
    });
    expect(res.status).toBe(422);
    expect((await json<ErrorBody>(res)).error).toMatchObject({ field: "zoneId", message: "That zone is not in this bin." });
    const stored = await crew.db.query(`select count(*)::int as n from feedings where bin_id = $1`, [bin.id]);
    expect(stored.rows[0].n).toBe(0);
  });
});

describe("rules", () => {
  type Rules = {
    species: string;
    overrides: Record<string, { thresholds?: Record<string, number> } | undefined>;
    effective: Record<string, { t: Record<string, number> }>;
  };

  it("an owner's override applies, a setting the kind does not have is refused by name, and a reset takes it back", async () => {
    const bin = await newBin(crew.owner, crew.farmId, 1);
    const path = `/api/bins/${bin.id}/rules`;
    const put = await crew.owner.fetch(path, { method: "PUT", json: { kind: "heat", thresholds: { headsUpAboveC: 27 } } });
    expect(put.status).toBe(200);
    const after = await json<Rules>(await crew.viewer.fetch(path));
    expect(after.species).toBe("eisenia-fetida");
    expect(after.overrides.heat?.thresholds).toEqual({ headsUpAboveC: 27 });
    expect(after.effective.heat!.t.headsUpAboveC).toBe(27);

    const bad = await crew.owner.fetch(path, { method: "PUT", json: { kind: "heat", thresholds: { hotterThan: 30 } } });
    expect(bad.status).toBe(422);
    expect((await json<ErrorBody>(bad)).error.field).toBe("thresholds.hotterThan");

    const reset = await crew.owner.fetch(`${path}?kind=heat`, { method: "DELETE" });
    expect(await json<{ removed: number }>(reset)).toEqual({ removed: 1 });
    expect((await json<Rules>(await crew.viewer.fetch(path))).overrides.heat).toBeUndefined();
  });
});
