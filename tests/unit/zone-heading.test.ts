// Where a zone is heading, in words, from the rules' own trend code; and an alert's events in words.
import { describe, expect, it } from "vitest";
import type { SeriesAnswer } from "@/db/queries/series";
import { durationWords, eventWords } from "@/lib/server/alerts/alert-page-view";
import { moistureHeading, temperatureHeading } from "@/lib/server/zones/zone-heading-view";
import { getSpecies } from "@/lib/domain/species";

const NOW = Date.UTC(2026, 4, 1, 12, 0);
const MIN = 60_000;

/** One probe's readings every `stepMin` minutes over the last `hours`, value from minutes before now. */
function answer(metric: "temperature" | "moisture", hours: number, stepMin: number, value: (minutesAgo: number) => number): SeriesAnswer {
  const t: number[] = [];
  const mean: number[] = [];
  for (let m = hours * 60; m >= 0; m -= stepMin) {
    t.push((NOW - m * MIN) / 1000);
    mean.push(value(m));
  }
  return {
    metric,
    unit: null,
    displayUnit: "",
    from: "",
    to: "",
    source: "raw",
    bucketSeconds: null,
    series: [{ probeId: 1, code: "p", label: null, t, mean, min: mean, max: mean }],
  };
}

const fetida = getSpecies("eisenia-fetida")!;

describe("where a zone is heading", () => {
  it("a temperature climbing 1.8 °C an hour reads as rising 1.8 °C/h, and in °F/h on an imperial farm", () => {
    const rising = answer("temperature", 3, 5, (m) => 24 - (1.8 * m) / 60);
    expect(temperatureHeading(rising, "metric").words).toBe("Rising 1.8 °C/h over the last hour.");
    // 1.8 °C/h is 3.24 °F/h (a difference of 1 °C is 1.8 °F).
    expect(temperatureHeading(rising, "imperial").words).toBe("Rising 3.2 °F/h over the last hour.");
  });

  it("a steady temperature is steady; an hourly probe is too sparse to say", () => {
    expect(
      temperatureHeading(
        answer("temperature", 3, 5, () => 20),
        "metric",
      ).words,
    ).toBe("Steady over the last hour.");
    expect(
      temperatureHeading(
        answer("temperature", 6, 60, (m) => 20 + m / 60),
        "metric",
      ).ratePerHour,
    ).toBeNull();
  });

  it("a bed drying 2 % points a day says when it reaches the band's dry edge", () => {
    const low = fetida.moisturePct.comfortLow;
    // 5 points above the edge a day ago, 3 now: losing 2 a day.
    const drying = answer("moisture", 24, 15, (m) => low + 3 + (2 * m) / (24 * 60));
    const h = moistureHeading(drying, fetida, "UTC");
    expect(h.words).toMatch(
      new RegExp(`^Drying 2\\.0 % points a day over the last 24 hours; at this pace it reaches the dry edge of the band, ${low} %, about `),
    );
    // Now at low + 3; 3 points at 2 a day = 36 h from now.
    expect(Math.abs(h.crossingAt! - (NOW + 36 * 60 * MIN))).toBeLessThan(5 * MIN);
  });

  it("fewer than 6 hours of moisture readings is too soon for a trend", () => {
    expect(
      moistureHeading(
        answer("moisture", 4, 15, () => 78),
        fetida,
        "UTC",
      ).words,
    ).toBe("Fewer than 6 hours of readings: too soon to see a trend.");
  });
});

describe("an alert's events in words", () => {
  const at = new Date(NOW);
  const e = (type: string, extra: Partial<Parameters<typeof eventWords>[0]> = {}) =>
    ({ id: 1, alertId: "a", at, type, userId: "u", channel: null, detail: {}, userName: "Ada", ...extra }) as Parameters<typeof eventWords>[0];

  it("names who was pushed to, who claimed, who released the claim and the settle note", () => {
    expect(eventWords(e("sent", { channel: "push", detail: { reason: "raised" } }))).toBe("Pushed to Ada");
    expect(eventWords(e("sent", { channel: "email", detail: { reason: "reminder" } }))).toBe("Reminder e-mailed Ada");
    expect(eventWords(e("held", { channel: "push" }))).toBe("Held back for Ada's quiet hours");
    expect(eventWords(e("claimed"))).toBe("Claimed by Ada");
    expect(eventWords(e("released", { detail: { claim: true } }))).toBe("Ada released the claim");
    expect(eventWords(e("released", { channel: "push", detail: { releasedAt: at.toISOString() } }))).toBe("Sent to Ada after quiet hours");
    expect(eventWords(e("settled", { detail: { note: "probe was out" } }))).toBe("Settled by Ada, with a note: “probe was out”");
    expect(eventWords(e("settled", { userId: null, userName: null }))).toBe("Settled: the readings came back");
  });

  it("says how long after the raise each step came", () => {
    expect(durationWords(20_000)).toBe("under a minute");
    expect(durationWords(12 * MIN)).toBe("12 min");
    expect(durationWords(125 * MIN)).toBe("2 h 5 min");
    expect(durationWords(52 * 60 * MIN)).toBe("2 days 4 h");
  });
});
