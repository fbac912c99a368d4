import { describe, expect, it } from "vitest";
import { feedingsKey, ingredientsKey, isTodayKey, seriesKey, todayKey, zoneSeriesKey } from "@/lib/client/swr-keys";

// A server page primes SWR under zoneSeriesKey; the chart reads it through useSeries. A key that
// differs by one character would make the phone fetch again instead of painting at once.
describe("SWR keys", () => {
  it("the zone series key a page primes is the key useSeries asks for", () => {
    const zoneId = "0b6c5a8e-3f1d-4c2a-9e7b-5d4c3b2a1f00";
    for (const metric of ["temperature", "moisture", "ammonia"] as const) {
      expect(zoneSeriesKey(zoneId, metric)).toBe(seriesKey({ zoneId }, { metric }));
      const from = "2025-05-01T00:00:00.000Z";
      expect(zoneSeriesKey(zoneId, metric, from)).toBe(seriesKey({ zoneId }, { metric, from }));
    }
  });

  it("feeding and ingredient keys wait (null) until their ids exist", () => {
    expect(feedingsKey(null)).toBeNull();
    expect(ingredientsKey(null)).toBeNull();
    expect(feedingsKey("b1")).toBe("/api/bins/b1/feedings");
    expect(ingredientsKey("f1")).toBe("/api/farms/f1/ingredients");
  });

  it("a probe's series waits for its metric and carries its window", () => {
    expect(seriesKey({ probeId: 7 }, null)).toBeNull();
    expect(seriesKey(null, { metric: "temperature" })).toBeNull();
    expect(seriesKey({ probeId: 7 }, { metric: "moisture-raw", from: new Date("2025-05-01T00:00:00Z"), to: "2025-05-02T00:00:00.000Z" })).toBe(
      "/api/probes/7/series?metric=moisture-raw&from=2025-05-01T00%3A00%3A00.000Z&to=2025-05-02T00%3A00%3A00.000Z",
    );
  });

  it("the Today matcher knows every farm's Today key and nothing below it", () => {
    expect(isTodayKey(todayKey("f1"))).toBe(true);
    expect(isTodayKey("/api/farms/f1/today?x=1")).toBe(false);
    expect(isTodayKey("/api/farms/f1/probes")).toBe(false);
    expect(isTodayKey(null)).toBe(false);
  });
});
