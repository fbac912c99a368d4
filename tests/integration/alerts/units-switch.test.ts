// A farm that switches from metric to imperial sees its open alert in °F at once, even when its
// probe has gone quiet and no new reading would word the alert again.
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { db } from "@/db";
import { insertReadings } from "@/db/queries/readings";
import { alerts } from "@/db/schema";
import { evaluateZoneNow } from "@/lib/server/alerts/evaluate-zone";
import { updateFarmSettings } from "@/lib/server/farms/update-farm";
import { createProbes } from "../ingest/helpers";

describe("switching a farm's units", () => {
  it("words its open heat alert again in °F; a change of name alone leaves it be", async () => {
    const [probe] = await createProbes(1);
    const now = Date.now();
    // 27 °C for the last 20 minutes: above the red wiggler's comfortable 25 °C for more than 10 min.
    await insertReadings(
      Array.from({ length: 20 }, (_, k) => ({ probeId: probe!.id, metric: "temperature" as const, ts: new Date(now - (19 - k) * 60_000), value: 27 })),
    );
    const raised = await evaluateZoneNow(probe!.zoneId, new Date(now));
    expect(raised.map((t) => `${t.type} ${t.kind}`)).toEqual(["raise heat"]);
    const read = async () => (await db().select().from(alerts).where(eq(alerts.zoneId, probe!.zoneId)))[0]!;
    expect((await read()).message).toMatch(/27\.0 °C/);

    await updateFarmSettings({ farmId: probe!.farmId, units: "metric" }, { name: "Renamed farm" });
    expect((await read()).message).toMatch(/27\.0 °C/);

    await updateFarmSettings({ farmId: probe!.farmId, units: "metric" }, { unitSystem: "imperial" });
    const after = await read();
    expect(after.state).toBe("raised");
    expect(after.message).toMatch(/80\.6 °F/);
    expect(after.message).not.toMatch(/°C/);
  });
});
