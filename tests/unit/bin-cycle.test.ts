import { describe, expect, it } from "vitest";
import {
  CURING_DAYS,
  HARVESTABLE_MOISTURE_TOP,
  feedingInterval,
  harvestEstimate,
  harvestSideZone,
  harvestsPerMonth,
  nextFeeding,
  plannedHarvestWords,
} from "@/lib/domain/bin-cycle";

// A worked example of our own (invented for this test, not a published one), stated in full:
//   Farm in Europe/Dublin. The bin is fed every 21 days. Its last feeding, into the curing zone, was
//   logged 2026-10-24T09:30Z (10:30 on 24 Oct in Dublin, still summer time).
//   Next feeding due: 24 Oct + 21 days = 14 Nov. On 5 Nov that is in 9 days; on 17 Nov overdue by 3.
//   Harvest side: castings cure 42 days (6 weeks, common practice) → 24 Oct + 42 = 5 Dec.
//   The curing zone's daily mean moisture, at 12:00Z on 1–5 Nov: 75.6, 75.2, 74.8, 74.4, 74.0 %.
//   Least squares: −0.4 %/day. From 74.0 % on 5 Nov to 65 % (harvestable top, common practice):
//   9 / 0.4 = 22.5 days → a whole 23 days → 28 Nov. Ready = later of 5 Dec and 28 Nov = 5 Dec.
const TZ = "Europe/Dublin";
const LAST_FED = new Date("2026-10-24T09:30:00Z");
const series = (values: number[], firstDay = 1) =>
  values.map((pct, i) => ({ at: new Date(`2026-11-${String(firstDay + i).padStart(2, "0")}T12:00:00Z`), pct }));

describe("next feeding due", () => {
  it("is the last feeding's date plus the interval, counted in days left", () => {
    const due = nextFeeding({ lastFeedingAt: LAST_FED, intervalDays: 21, today: "2026-11-05", timeZone: TZ });
    expect(due).toMatchObject({ status: "later", lastFedOn: "2026-10-24", dueOn: "2026-11-14", daysLeft: 9, overdueDays: 0 });
    expect(due.words).toBe("Next feeding due 14 Nov, in 9 days (last fed 24 Oct, every 21 days).");
  });

  it("says overdue by N days after the due date, and due today on it", () => {
    const late = nextFeeding({ lastFeedingAt: LAST_FED, intervalDays: 21, today: "2026-11-17", timeZone: TZ });
    expect(late).toMatchObject({ status: "overdue", dueOn: "2026-11-14", overdueDays: 3 });
    expect(late.words).toBe("Feeding overdue by 3 days: it was due 14 Nov (last fed 24 Oct, every 21 days).");
    const today = nextFeeding({ lastFeedingAt: LAST_FED, intervalDays: 21, today: "2026-11-14", timeZone: TZ });
    expect(today.status).toBe("today");
    expect(today.words).toBe("Feeding due today (last fed 24 Oct, every 21 days).");
  });

  it("counts from the farm's own calendar day, not UTC's", () => {
    // 23:30Z on 24 Oct is 12:30 on 25 Oct in Auckland (UTC+13 in summer time).
    const due = nextFeeding({ lastFeedingAt: new Date("2026-10-24T23:30:00Z"), intervalDays: 21, today: "2026-11-05", timeZone: "Pacific/Auckland" });
    expect(due).toMatchObject({ lastFedOn: "2026-10-25", dueOn: "2026-11-15" });
  });

  it("says so when the bin was never fed", () => {
    const due = nextFeeding({ lastFeedingAt: null, intervalDays: 14, today: "2026-11-05", timeZone: TZ });
    expect(due).toEqual({ status: "never", intervalDays: 14, words: "No feeding logged yet (fed every 14 days)." });
  });

  it("takes the bin's interval over the farm's, and the farm's over the default", () => {
    expect(feedingInterval(10, 21)).toEqual({ days: 10, from: "bin" });
    expect(feedingInterval(null, 28)).toEqual({ days: 28, from: "farm" });
    expect(feedingInterval(null, null)).toEqual({ days: 21, from: "default" });
  });
});

describe("the harvest side's estimate", () => {
  it("the worked example: curing ends 5 Dec, drying 28 Nov, ready about 5 Dec, said in words", () => {
    expect(CURING_DAYS).toBe(42);
    expect(HARVESTABLE_MOISTURE_TOP).toBe(65);
    const e = harvestEstimate({
      today: "2026-11-05",
      timeZone: TZ,
      lastFeedingAt: LAST_FED,
      lastShiftInAt: null,
      moisture: series([75.6, 75.2, 74.8, 74.4, 74.0]),
    });
    expect(e.curingOn).toBe("2026-12-05");
    expect(e.moisture?.latestPct).toBe(74);
    expect(e.moisture?.perDay).toBeCloseTo(-0.4, 9);
    expect(e.moisture?.dryingOn).toBe("2026-11-28");
    expect(e.readyOn).toBe("2026-12-05");
    expect(e.ready).toBe(false);
    expect(e.lines).toEqual([
      "Curing side last fed 24 Oct; castings cure about 6 weeks (common practice) → 5 Dec.",
      "Moisture 74 %, falling 0.4 %/day, reaches 65 % about 28 Nov (harvestable below 65 %: common practice).",
      "Ready about 5 Dec.",
    ]);
  });

  it("waits for the drying when it comes after the curing", () => {
    // −0.1 %/day: 9 points to lose take 90 days from 5 Nov → 3 Feb 2027, after 5 Dec.
    const e = harvestEstimate({
      today: "2026-11-05",
      timeZone: TZ,
      lastFeedingAt: LAST_FED,
      lastShiftInAt: null,
      moisture: series([74.4, 74.3, 74.2, 74.1, 74.0]),
    });
    expect(e.moisture?.dryingOn).toBe("2027-02-03");
    expect(e.readyOn).toBe("2027-02-03");
    expect(e.lines.at(-1)).toBe("Ready about 3 Feb 2027.");
  });

  it("starts the curing from a later shift of material onto the curing side", () => {
    const e = harvestEstimate({
      today: "2026-11-12",
      timeZone: TZ,
      lastFeedingAt: LAST_FED,
      lastShiftInAt: new Date("2026-11-10T15:00:00Z"),
      moisture: [],
    });
    expect(e).toMatchObject({ lastFedBy: "shift", lastFedOn: "2026-11-10", curingOn: "2026-12-22", readyOn: "2026-12-22" });
    expect(e.lines).toEqual([
      "Material last shifted onto the curing side 10 Nov; castings cure about 6 weeks (common practice) → 22 Dec.",
      "No moisture readings from the curing side: the date rests on curing time alone.",
      "Ready about 22 Dec.",
    ]);
  });

  it("gives no date while the curing side is not drying", () => {
    const e = harvestEstimate({ today: "2026-11-05", timeZone: TZ, lastFeedingAt: LAST_FED, lastShiftInAt: null, moisture: series([72, 73, 74, 75, 76]) });
    expect(e.readyOn).toBeNull();
    expect(e.lines[1]).toBe("Moisture 76 %, rising 1.0 %/day: not drying toward 65 %, so no date until it does (harvestable below 65 %: common practice).");
    expect(e.lines).toHaveLength(2);
  });

  it("needs three daily points over two days for a trend", () => {
    const e = harvestEstimate({ today: "2026-11-05", timeZone: TZ, lastFeedingAt: LAST_FED, lastShiftInAt: null, moisture: series([75, 74]) });
    expect(e.moisture?.perDay).toBeNull();
    expect(e.readyOn).toBeNull();
    expect(e.lines[1]).toContain("no trend yet");
  });

  it("is ready once both dates have passed, and dry enough counts from the latest reading", () => {
    const e = harvestEstimate({ today: "2026-12-07", timeZone: TZ, lastFeedingAt: LAST_FED, lastShiftInAt: null, moisture: series([66, 65, 64], 20) });
    expect(e.moisture?.dryingOn).toBe("2026-11-22");
    expect(e.readyOn).toBe("2026-12-05");
    expect(e.ready).toBe(true);
    expect(e.lines.at(-1)).toBe("Ready to harvest since about 5 Dec.");
  });

  it("has no date before any food went onto the curing side", () => {
    const e = harvestEstimate({ today: "2026-11-05", timeZone: TZ, lastFeedingAt: null, lastShiftInAt: null, moisture: [] });
    expect(e.readyOn).toBeNull();
    expect(e.lines[0]).toBe("No feeding or shift onto the curing side logged yet; castings cure about 6 weeks (common practice) after the last food.");
  });

  it("applies to flow-through and windrow bins with a curing zone, the one furthest from the feeding side", () => {
    const zones = [
      { id: "a", kind: "fresh" as const, position: 1 },
      { id: "b", kind: "curing" as const, position: 2 },
      { id: "c", kind: "curing" as const, position: 3 },
    ];
    expect(harvestSideZone("flow-through", zones)?.id).toBe("c");
    expect(harvestSideZone("windrow", zones)?.id).toBe("c");
    expect(harvestSideZone("tote", zones)).toBeNull();
    expect(harvestSideZone("flow-through", [{ id: "a", kind: "working", position: 1 }])).toBeNull();
  });

  it("sets a planned harvest beside the estimate", () => {
    expect(plannedHarvestWords("2026-12-01", { readyOn: "2026-12-05" }, "2026-11-05")).toBe(
      "Harvest planned for 1 Dec, before the estimate (5 Dec): check the curing side is dry and finished first.",
    );
    expect(plannedHarvestWords("2026-12-10", { readyOn: "2026-12-05" }, "2026-11-05")).toBe("Harvest planned for 10 Dec, on or after the estimate (5 Dec).");
    expect(plannedHarvestWords(null, null, "2026-11-05")).toBeNull();
  });
});

describe("castings per month", () => {
  it("sums each farm-local month and keeps empty months between as 0", () => {
    const months = harvestsPerMonth(
      [
        { at: new Date("2026-10-10T10:00:00Z"), massKg: 3.2 },
        { at: new Date("2026-12-02T10:00:00Z"), massKg: 2 },
        { at: new Date("2026-12-20T10:00:00Z"), massKg: 1.5 },
      ],
      TZ,
    );
    expect(months).toEqual([
      { month: "2026-10", massKg: 3.2, count: 1 },
      { month: "2026-11", massKg: 0, count: 0 },
      { month: "2026-12", massKg: 3.5, count: 2 },
    ]);
  });

  it("puts a harvest in the month of the farm's calendar", () => {
    const late = [{ at: new Date("2026-11-30T23:30:00Z"), massKg: 1 }];
    expect(harvestsPerMonth(late, "Europe/Dublin")[0]!.month).toBe("2026-11");
    expect(harvestsPerMonth(late, "Asia/Tokyo")[0]!.month).toBe("2026-12");
  });
});
