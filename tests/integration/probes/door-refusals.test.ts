// Refusals at the door (a wrong token, a topic not the probe's own) recorded for a known probe, at
// most one a minute per kind, and read on its page in plain words; an unknown code records nothing.
import { sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { db } from "@/db";
import { REFUSAL_SENTENCES } from "@/lib/domain/refusal-words";
import { probeHealth } from "@/lib/server/probes/probe-health";
import { recordDoorRefusal } from "@/lib/server/probes/record-door-refusal";
import { createProbes, rejectionsOf, type TestProbe } from "../ingest/helpers";

describe("refusals at the door", () => {
  it("a wrong token is recorded once a minute per probe, and reads as a wrong token on the probe's page", async () => {
    const [p] = (await createProbes(1)) as [TestProbe];
    expect(await recordDoorRefusal("http", p.code, "wrong-token")).toBe(true);
    expect(await recordDoorRefusal("http", p.code, "wrong-token")).toBe(false);
    expect(await recordDoorRefusal("mqtt", p.code, "wrong-topic", `wormward/${p.code}/up`)).toBe(true);
    const rows = await rejectionsOf(p.id);
    expect(rows.map((r) => [r.source, r.reason.split(":")[0], r.topic])).toEqual([
      ["http", "wrong-token", null],
      ["mqtt", "wrong-topic", `wormward/${p.code}/up`],
    ]);
    const h = await probeHealth({ farmId: p.farmId }, p.id);
    expect(h.presence.state).toBe("no-reading-yet");
    expect(h.refusals.map((r) => r.sentence)).toEqual([REFUSAL_SENTENCES["wrong-topic"], REFUSAL_SENTENCES["wrong-token"]]);

    // A minute later, the next one is recorded again.
    await db().execute(sql`update rejected_messages set received_at = received_at - interval '61 seconds' where probe_id = ${p.id}`);
    expect(await recordDoorRefusal("http", p.code, "wrong-token")).toBe(true);
    expect(await rejectionsOf(p.id)).toHaveLength(3);
  });

  it("a code that names no probe records nothing", async () => {
    const before = await db().execute<{ n: number }>(sql`select count(*)::int as n from rejected_messages`);
    expect(await recordDoorRefusal("mqtt", "no-such-probe-code", "wrong-token")).toBe(false);
    const after = await db().execute<{ n: number }>(sql`select count(*)::int as n from rejected_messages`);
    expect(after.rows[0]!.n).toBe(before.rows[0]!.n);
  });
});
