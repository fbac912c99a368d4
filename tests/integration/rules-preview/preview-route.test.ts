// POST /api/bins/[binId]/rules/preview: an owner's unsaved heat change replayed over the bin's last
// 30 days. The counts must be what replay() (lib/domain/rules, the live rules' code) gives on the
// same readings and feedings; nothing is stored; keepers and viewers are refused; another farm's
// bin is not found.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { ALERT_KINDS, replay, type ReplayInput } from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";
import { PREVIEW_STEP_MINUTES, previewTimes } from "@/lib/server/rules/preview";
import { crewFarm, json, newBin, type Crew } from "../logbook/helpers";
import { heatHistory, probeWithReadings, SPELLS } from "./fixtures";

type Counts = { heads_up: number; act_now: number };
type Answer = {
  from: number;
  to: number;
  hasReadings: boolean;
  now: Counts;
  proposed: Counts;
  zones: { id: string; spans: unknown[]; line: { t: number[] } }[];
};
type ErrorBody = { error: { code: string; field?: string; message: string } };

const MINUTE = 60_000;
const HOUR = 3_600_000;
let crew: Crew;
let bin: Awaited<ReturnType<typeof newBin>>;
let points: ReturnType<typeof heatHistory>;
let probeId: number;
let feedingAt: number;
const change = { kind: "heat", enabled: true, thresholds: { headsUpAboveC: 23 } };

beforeAll(async () => {
  crew = await crewFarm("Zz Rule Preview Farm");
  bin = await newBin(crew.owner, crew.farmId, 1);
  points = heatHistory(Date.now(), SPELLS);
  probeId = await probeWithReadings(crew.db, crew.farmId, bin.zones[0]!.id, points);
  // A feeding 12 days ago, so the replay also carries the post-feed watch.
  feedingAt = Math.floor((Date.now() - 12 * 24 * HOUR) / 1000) * 1000;
  await crew.db.query(`insert into feedings (farm_id, bin_id, at, total_kg, mix_moisture_pct, mix_cn) values ($1, $2, $3, 3, 80, 24)`, [
    crew.farmId,
    bin.id,
    new Date(feedingAt),
  ]);
});
afterAll(async () => {
  await crew?.close();
});

/** Alerts per level from replay()'s own transitions: a raise counts at its level, an escalation moves it to act now. */
function countDirect(input: ReplayInput, times: number[]): Counts {
  const level = new Map<string, keyof Counts>();
  const all: (keyof Counts)[] = [];
  for (const step of replay(input, times)) {
    for (const t of step.transitions) {
      if (t.type === "raise") {
        all.push(t.level);
        level.set(t.subject, t.level);
      } else if (t.type === "escalate" && level.get(t.subject) === "heads_up") {
        all[all.lastIndexOf("heads_up")] = "act_now";
        level.set(t.subject, "act_now");
      } else if (t.type === "settle") level.delete(t.subject);
    }
  }
  return { heads_up: all.filter((l) => l === "heads_up").length, act_now: all.filter((l) => l === "act_now").length };
}

describe("POST /api/bins/[binId]/rules/preview", () => {
  it("gives the counts replay() gives on the same data, for the saved rules and for the change", async () => {
    const before = (await crew.db.query(`select count(*)::int as n from rules where farm_id = $1`, [crew.farmId])).rows[0].n;
    const res = await crew.owner.fetch(`/api/bins/${bin.id}/rules/preview`, { method: "POST", json: change });
    expect(res.status).toBe(200);
    const answer = await json<Answer>(res);
    expect(answer.hasReadings).toBe(true);
    expect(answer.to - answer.from).toBe(30 * 24 * HOUR);

    const input = (overrides: ReplayInput["overrides"]): ReplayInput => ({
      zone: { id: bin.zones[0]!.id, kind: "fresh", binName: "preview bin" },
      species: speciesProfiles["eisenia-fetida"],
      overrides,
      readings: [{ probeId, metric: "temperature", points: points.filter((p) => p.t <= answer.to) }],
      recentFeedings: [{ at: feedingAt, zoneId: null, mixMoisturePct: 80, mixCn: 24, totalKg: 3 }],
      probes: [{ id: probeId, code: "p", reportIntervalS: 300, lastSeenAt: points.at(-1)!.t, metrics: ["temperature"] }],
      kinds: ["heat"],
    });
    const times = previewTimes(answer.from, answer.to, PREVIEW_STEP_MINUTES * MINUTE, [feedingAt]);
    const now = countDirect(input({}), times);
    const proposed = countDirect(input({ heat: { enabled: true, thresholds: { headsUpAboveC: 23 } } }), times);
    expect(answer.now).toEqual(now);
    expect(answer.proposed).toEqual(proposed);
    // The data crosses 25 °C twice and 23 °C five times (fixtures.ts): the change must raise more.
    expect(proposed.heads_up + proposed.act_now).toBeGreaterThan(now.heads_up + now.act_now);
    expect(answer.zones[0]!.spans).toHaveLength(proposed.heads_up + proposed.act_now);
    expect(answer.zones[0]!.line.t.length).toBeGreaterThan(24 * 29);

    // A preview stores nothing.
    expect((await crew.db.query(`select count(*)::int as n from rules where farm_id = $1`, [crew.farmId])).rows[0].n).toBe(before);
  });

  it("every kind previews, each drawn on its own metric, an unchanged rule giving the same counts twice", async () => {
    for (const kind of ALERT_KINDS) {
      const res = await crew.owner.fetch(`/api/bins/${bin.id}/rules/preview`, { method: "POST", json: { kind } });
      expect(res.status, kind).toBe(200);
      const answer = await json<Answer & { kind: string; zones: { metric: string }[] }>(res);
      expect(answer.kind).toBe(kind);
      expect(answer.proposed, kind).toEqual(answer.now);
      expect(answer.zones[0]!.metric, kind).toBe(kind === "drying" || kind === "soggy" ? "moisture" : "temperature");
    }
  });

  it("a keeper and a viewer are refused in words", async () => {
    for (const who of [crew.keeper, crew.viewer]) {
      const res = await who.fetch(`/api/bins/${bin.id}/rules/preview`, { method: "POST", json: change });
      expect(res.status).toBe(403);
      expect((await json<ErrorBody>(res)).error.message).toMatch(/cannot do this; ask an owner/);
    }
  });

  it("another farm's bin is not found", async () => {
    const farm = (await crew.db.query(`insert into farms (name) values ('Zz Preview Other Farm') returning id`)).rows[0].id as string;
    try {
      const other = (
        await crew.db.query(`insert into bins (farm_id, name, style, species) values ($1, 'Not yours', 'tote', 'eisenia-fetida') returning id`, [farm])
      ).rows[0].id as string;
      const res = await crew.owner.fetch(`/api/bins/${other}/rules/preview`, { method: "POST", json: change });
      expect(res.status).toBe(404);
    } finally {
      await crew.db.query(`delete from farms where id = $1`, [farm]);
    }
  });

  it("a negative hold is refused naming the field, before anything is replayed", async () => {
    const res = await crew.owner.fetch(`/api/bins/${bin.id}/rules/preview`, { method: "POST", json: { kind: "heat", thresholds: { raiseMinutes: -5 } } });
    expect(res.status).toBe(422);
    const body = await json<ErrorBody>(res);
    expect(body.error.field).toBe("thresholds.raiseMinutes");
    expect(body.error.message).toMatch(/cannot be negative/);
  });

  it("a bin with no readings in 30 days says so", async () => {
    const empty = await newBin(crew.owner, crew.farmId, 1);
    const res = await crew.owner.fetch(`/api/bins/${empty.id}/rules/preview`, { method: "POST", json: change });
    expect(res.status).toBe(200);
    const answer = await json<Answer>(res);
    expect(answer.hasReadings).toBe(false);
    expect(answer.now).toEqual({ heads_up: 0, act_now: 0 });
  });
});
