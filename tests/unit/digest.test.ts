import { describe, expect, it } from "vitest";
import type { DigestData } from "@/db/queries/digest";
import { addDays, dayBounds, localClock, renderDigest } from "@/lib/server/alerts/digest";
import { cautionFor } from "@/lib/domain/alert-words";
import { CASTINGS_NOT_FOOD, LOCAL_CODES, WASH_HANDS } from "@/lib/domain/safety-words";

describe("farm-local days", () => {
  it("a summer day in Dublin runs from 23:00 UTC to 23:00 UTC", () => {
    const { from, to } = dayBounds("2026-07-14", "Europe/Dublin");
    expect(from.toISOString()).toBe("2026-07-13T23:00:00.000Z");
    expect(to.toISOString()).toBe("2026-07-14T23:00:00.000Z");
  });

  // Directive 2000/84/EC Art. 2-3: summer time starts and ends at 01:00 UTC on the last Sunday
  // of March and of October (29 March and 25 October in 2026).
  it("the day summer time starts has 23 hours, the day it ends 25", () => {
    const spring = dayBounds("2026-03-29", "Europe/Dublin");
    expect(spring.from.toISOString()).toBe("2026-03-29T00:00:00.000Z");
    expect((spring.to.getTime() - spring.from.getTime()) / 3_600_000).toBe(23);
    const autumn = dayBounds("2026-10-25", "Europe/Dublin");
    expect(autumn.from.toISOString()).toBe("2026-10-24T23:00:00.000Z");
    expect((autumn.to.getTime() - autumn.from.getTime()) / 3_600_000).toBe(25);
  });

  it("a zone behind UTC: 14 July in New York starts at 04:00 UTC", () => {
    expect(dayBounds("2026-07-14", "America/New_York").from.toISOString()).toBe("2026-07-14T04:00:00.000Z");
  });

  it("the local clock gives the farm's date and minutes past midnight", () => {
    expect(localClock(new Date("2026-07-14T23:30:00Z"), "Europe/Dublin")).toEqual({ date: "2026-07-15", minutes: 30 });
    expect(localClock(new Date("2026-01-01T06:59:00Z"), "UTC")).toEqual({ date: "2026-01-01", minutes: 419 });
  });

  it("days add across month and year ends", () => {
    expect(addDays("2026-03-01", -1)).toBe("2026-02-28");
    expect(addDays("2026-12-31", 1)).toBe("2027-01-01");
  });
});

describe("the digest text", () => {
  const data: DigestData = {
    bins: [{ id: "b1", name: "Shed Tote", feedingIntervalDays: null }],
    zones: [
      { id: "z1", binId: "b1", kind: "working", name: null, position: 1 },
      { id: "z2", binId: "b1", kind: "curing", name: "Harvest end", position: 2 },
    ],
    ranges: [
      { zoneId: "z1", metric: "temperature", min: 20, max: 25 },
      { zoneId: "z1", metric: "moisture", min: 80, max: 80 },
    ],
    alerts: [
      { binId: "b1", kind: "soggy", level: "heads_up", raised: 1, settled: 0 },
      { binId: "b1", kind: "heat", level: "heads_up", raised: 2, settled: 1 },
    ],
    feedings: [{ binId: "b1", count: 1, totalKg: 4.5359237 }],
    // 10:00Z on 20 Jan is 04:00 on 20 Jan in Chicago; on the farm's 21 days the next is due 10 Feb.
    lastFeedings: [{ binId: "b1", at: new Date("2026-01-20T10:00:00Z") }],
    farmFeedingIntervalDays: 21,
  };

  it("uses the farm's units: °F and lb for an imperial farm", () => {
    const d = renderDigest({
      farm: { id: "f1", name: "Back Yard", unitSystem: "imperial", timezone: "America/Chicago" },
      date: "2026-02-03",
      data,
      appUrl: "http://app.test",
    });
    expect(d.subject).toBe("[Wormward] Back Yard: your day, Tuesday 3 February 2026");
    // 20 °C = 68 °F, 25 °C = 77 °F; 4.5359237 kg = 10 lb exactly (1 lb = 0.45359237 kg).
    expect(d.text).toContain("  Working zone: temperature 68.0–77.0 °F, moisture 80 %\n");
    expect(d.text).toContain("  Harvest end: no readings\n");
    expect(d.text).toContain(`  Alerts: 3 raised (2 heads-up heat, 1 heads-up soggy), 1 settled\n  ${cautionFor("heat")}\n`);
    expect(d.text).toContain("  Feedings: 1 logged, 10.0 lb in all\n");
    // The digest of 3 Feb is read on 4 Feb: 6 days before 10 Feb.
    expect(d.text).toContain("  Next feeding due 10 Feb, in 6 days (last fed 20 Jan, every 21 days).\n");
    expect(d.text).toContain("Open Today: http://app.test/farms/f1");
    // The handling cautions close every digest.
    expect(d.text).toContain(`${CASTINGS_NOT_FOOD} ${WASH_HANDS} ${LOCAL_CODES}`);
  });

  it("says the closed-room caution under a bin's heat or ammonia alerts, once, and not under others", () => {
    const render = (alerts: DigestData["alerts"]) =>
      renderDigest({
        farm: { id: "f1", name: "Back Yard", unitSystem: "metric", timezone: "UTC" },
        date: "2026-02-03",
        data: { ...data, alerts },
        appUrl: "http://app.test",
      });
    const both = render([
      { binId: "b1", kind: "heat", level: "act_now", raised: 1, settled: 0 },
      { binId: "b1", kind: "ammonia", level: "heads_up", raised: 1, settled: 0 },
    ]);
    expect(both.text.split(cautionFor("ammonia")!)).toHaveLength(2);
    expect(both.html).toContain("air the room");
    expect(render([{ binId: "b1", kind: "soggy", level: "heads_up", raised: 1, settled: 0 }]).text).not.toContain("closed room");
    // Settled only, none raised that day: nothing to warn of.
    expect(render([{ binId: "b1", kind: "heat", level: "heads_up", raised: 0, settled: 1 }]).text).not.toContain("closed room");
  });

  it("says a bin's feeding overdue on its own interval, or that it was never fed", () => {
    const render = (over: Partial<DigestData>) =>
      renderDigest({
        farm: { id: "f1", name: "Back Yard", unitSystem: "metric", timezone: "UTC" },
        date: "2026-02-03",
        data: { ...data, ...over },
        appUrl: "http://app.test",
      });
    // Own interval 10 days: 20 Jan + 10 = 30 Jan; read on 4 Feb, 5 days late.
    expect(render({ bins: [{ id: "b1", name: "Shed Tote", feedingIntervalDays: 10 }] }).text).toContain(
      "  Feeding overdue by 5 days: it was due 30 Jan (last fed 20 Jan, every 10 days).\n",
    );
    expect(render({ lastFeedings: [] }).text).toContain("  No feeding logged yet (fed every 21 days).\n");
  });

  it("escapes names in the HTML part", () => {
    const d = renderDigest({
      farm: { id: "f1", name: "<Worms & Co>", unitSystem: "metric", timezone: "UTC" },
      date: "2026-02-03",
      data,
      appUrl: "http://app.test",
    });
    expect(d.html).toContain("&lt;Worms &amp; Co&gt;");
    expect(d.html).not.toContain("<Worms");
  });
});
