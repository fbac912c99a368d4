// Water, harvests and notes logged through the API, the merged logbook, and the 24-hour undo.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { crewFarm, json, newBin, type Crew } from "./helpers";

type ErrorBody = { error: { code: string; field?: string; message: string } };
type Entry = { kind: string; id: string; at: string; byName: string | null; litres?: number; massKg?: number; text?: string };

let crew: Crew;
let bin: Awaited<ReturnType<typeof newBin>>;
let otherBin: Awaited<ReturnType<typeof newBin>>;

beforeAll(async () => {
  crew = await crewFarm("Zz Logbook Entries Farm");
  bin = await newBin(crew.owner, crew.farmId);
  otherBin = await newBin(crew.owner, crew.farmId);
});
afterAll(async () => {
  await crew?.close();
});

const hoursAgo = (h: number) => new Date(Date.now() - h * 3600_000).toISOString();

describe("watering, harvest and note", () => {
  it("a keeper's watering, harvest and note come back from their lists, newest first, with who", async () => {
    const zone = bin.zones[1]!.id;
    const w1 = await crew.keeper.fetch(`/api/bins/${bin.id}/waterings`, {
      method: "POST",
      json: { litres: 2.5, zoneId: zone, at: hoursAgo(3), notes: "dry corner" },
    });
    expect(w1.status).toBe(201);
    const w2 = await crew.keeper.fetch(`/api/bins/${bin.id}/waterings`, { method: "POST", json: { litres: 0.75 } });
    expect(w2.status).toBe(201);
    const h = await crew.keeper.fetch(`/api/bins/${bin.id}/harvests`, { method: "POST", json: { massKg: 6.2, zoneId: bin.zones[2]!.id } });
    expect(h.status).toBe(201);
    const n = await crew.keeper.fetch(`/api/bins/${bin.id}/notes`, { method: "POST", json: { text: "  springtails under the lid  " } });
    expect(n.status).toBe(201);

    const waterings = (
      await json<{ waterings: { litres: number; zoneId: string | null; notes: string | null; byName: string }[] }>(
        await crew.viewer.fetch(`/api/bins/${bin.id}/waterings`),
      )
    ).waterings;
    expect(waterings.map((w) => w.litres)).toEqual([0.75, 2.5]);
    const keeperName = (await crew.db.query(`select name from users where email = 'tomas@alder-row.example'`)).rows[0].name;
    expect(waterings[1]).toMatchObject({ zoneId: zone, notes: "dry corner", byName: keeperName });
    expect(waterings[0]!.byName).toBe(keeperName);
    const harvests = (await json<{ harvests: { massKg: number }[] }>(await crew.viewer.fetch(`/api/bins/${bin.id}/harvests`))).harvests;
    expect(harvests.map((x) => x.massKg)).toEqual([6.2]);
    const notes = (await json<{ notes: { text: string }[] }>(await crew.viewer.fetch(`/api/bins/${bin.id}/notes`))).notes;
    expect(notes.map((x) => x.text)).toEqual(["springtails under the lid"]);
  });

  it("a viewer may read but not log", async () => {
    const res = await crew.viewer.fetch(`/api/bins/${bin.id}/waterings`, { method: "POST", json: { litres: 1 } });
    expect(res.status).toBe(403);
  });

  it("negative and zero amounts are refused with the field at fault", async () => {
    for (const [path, body, field] of [
      ["waterings", { litres: -1 }, "litres"],
      ["waterings", { litres: 0 }, "litres"],
      ["harvests", { massKg: -0.5 }, "massKg"],
      ["notes", { text: "   " }, "text"],
    ] as const) {
      const res = await crew.keeper.fetch(`/api/bins/${bin.id}/${path}`, { method: "POST", json: body });
      expect(res.status, `${path} ${JSON.stringify(body)}`).toBe(422);
      expect((await json<ErrorBody>(res)).error.field).toBe(field);
    }
    const stored = await crew.db.query(`select count(*)::int as n from waterings where bin_id = $1 and litres <= 0`, [bin.id]);
    expect(stored.rows[0].n).toBe(0);
  });

  it("a zone of another bin is refused", async () => {
    const res = await crew.keeper.fetch(`/api/bins/${bin.id}/harvests`, { method: "POST", json: { massKg: 1, zoneId: otherBin.zones[0]!.id } });
    expect(res.status).toBe(422);
    const body = await json<ErrorBody>(res);
    expect(body.error.field).toBe("zoneId");
    expect(body.error.message).toMatch(/not in this bin/);
  });

  it("an entry dated in the future is refused", async () => {
    const res = await crew.keeper.fetch(`/api/bins/${bin.id}/notes`, {
      method: "POST",
      json: { text: "tomorrow", at: new Date(Date.now() + 3600_000).toISOString() },
    });
    expect(res.status).toBe(422);
    expect((await json<ErrorBody>(res)).error.field).toBe("at");
  });
});

describe("the merged logbook", () => {
  it("lists feedings, water, harvests, notes and samples of one bin in time order, newest first", async () => {
    const b = await newBin(crew.owner, crew.farmId);
    const probe = (
      await crew.db.query(`insert into probes (farm_id, zone_id, code, token_hash) values ($1, $2, $3, 'x') returning id`, [
        crew.farmId,
        b.zones[0]!.id,
        `log-${Math.random().toString(36).slice(2, 9)}`,
      ])
    ).rows[0].id;
    const post = async (path: string, body: unknown) => {
      const res = await crew.keeper.fetch(path, { method: "POST", json: body });
      expect(res.status, await res.clone().text()).toBe(201);
    };
    // Logged out of time order on purpose: the list orders by when the work was done.
    await post(`/api/bins/${b.id}/notes`, { text: "turned the curing end", at: hoursAgo(5) });
    await post(`/api/bins/${b.id}/harvests`, { massKg: 3, at: hoursAgo(1) });
    await post(`/api/bins/${b.id}/feedings`, { at: hoursAgo(4), items: [{ name: "vegetable scraps", massKg: 2, moisturePct: 87, nitrogenPct: 2.7, cn: 19 }] });
    await post(`/api/probes/${probe}/samples`, { wetMassG: 10, dryMassG: 2.3, rawReading: 455, at: hoursAgo(2) });
    await post(`/api/bins/${b.id}/waterings`, { litres: 1.2, at: hoursAgo(3) });
    // Another bin's entry stays out.
    await post(`/api/bins/${otherBin.id}/notes`, { text: "other bin", at: hoursAgo(1.5) });

    const res = await crew.viewer.fetch(`/api/bins/${b.id}/logbook`);
    expect(res.status).toBe(200);
    const { entries } = await json<{ entries: (Entry & { moistureWbPct?: number })[] }>(res);
    expect(entries.map((e) => e.kind)).toEqual(["harvest", "sample", "watering", "feeding", "note"]);
    const times = entries.map((e) => Date.parse(e.at));
    expect([...times].sort((x, y) => y - x)).toEqual(times);
    expect(entries.every((e) => e.byName && e.byName.length > 0)).toBe(true);
    expect(entries.find((e) => e.kind === "watering")!.litres).toBeCloseTo(1.2, 5);
    expect(entries.find((e) => e.kind === "note")!.text).toBe("turned the curing end");
    expect(entries.find((e) => e.kind === "sample")!.moistureWbPct).toBeCloseTo(77, 5);
  });
});

describe("undo within 24 hours", () => {
  const note = async (who: Crew["keeper"]) => {
    const res = await who.fetch(`/api/bins/${bin.id}/notes`, { method: "POST", json: { text: `undo me ${Math.random()}` } });
    return (await json<{ note: { id: string } }>(res)).note.id;
  };
  const exists = async (id: string) => (await crew.db.query(`select 1 from log_notes where id = $1`, [id])).rowCount === 1;

  it("the author removes their own entry", async () => {
    const id = await note(crew.keeper);
    const res = await crew.keeper.fetch(`/api/logbook/note/${id}`, { method: "DELETE" });
    expect(res.status).toBe(200);
    expect(await exists(id)).toBe(false);
    const again = await crew.keeper.fetch(`/api/logbook/note/${id}`, { method: "DELETE" });
    expect(again.status).toBe(404);
  });

  it("another keeper cannot remove it, and neither can a viewer", async () => {
    const id = await note(crew.keeper);
    const res = await crew.otherKeeper.fetch(`/api/logbook/note/${id}`, { method: "DELETE" });
    expect(res.status).toBe(403);
    expect((await crew.viewer.fetch(`/api/logbook/note/${id}`, { method: "DELETE" })).status).toBe(403);
    expect(await exists(id)).toBe(true);
  });

  it("after 24 hours the author cannot, but an owner still can", async () => {
    const id = await note(crew.keeper);
    await crew.db.query(`update log_notes set created_at = now() - interval '25 hours' where id = $1`, [id]);
    const late = await crew.keeper.fetch(`/api/logbook/note/${id}`, { method: "DELETE" });
    expect(late.status).toBe(403);
    expect((await json<ErrorBody>(late)).error.message).toMatch(/24 hours/);
    expect(await exists(id)).toBe(true);
    expect((await crew.owner.fetch(`/api/logbook/note/${id}`, { method: "DELETE" })).status).toBe(200);
    expect(await exists(id)).toBe(false);
  });

  it("each kind can be undone, and an unknown kind is not found", async () => {
    const w = await json<{ watering: { id: string } }>(await crew.keeper.fetch(`/api/bins/${bin.id}/waterings`, { method: "POST", json: { litres: 1 } }));
    expect((await crew.keeper.fetch(`/api/logbook/watering/${w.watering.id}`, { method: "DELETE" })).status).toBe(200);
    expect((await crew.db.query(`select 1 from waterings where id = $1`, [w.watering.id])).rowCount).toBe(0);
    // The id is a watering's, asked for as a harvest: nothing of that kind has it.
    const w2 = await json<{ watering: { id: string } }>(await crew.keeper.fetch(`/api/bins/${bin.id}/waterings`, { method: "POST", json: { litres: 1 } }));
    expect((await crew.keeper.fetch(`/api/logbook/harvest/${w2.watering.id}`, { method: "DELETE" })).status).toBe(404);
    expect((await crew.keeper.fetch(`/api/logbook/compost/${w2.watering.id}`, { method: "DELETE" })).status).toBe(404);
  });
});
