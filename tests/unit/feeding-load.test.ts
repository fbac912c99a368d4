import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { HEAVY_FEED_KG, HEAVY_FEED_KG_PER_M2, WEEKLY_RATE_KG_PER_M2, feedingLoadWords, floorAreaM2, loadForBin } from "@/lib/domain/feeding-load";
import { RULE_PARAMETERS, resolveRules } from "@/lib/domain/rules/params";
import { feedingLoad as ruleLoad } from "@/lib/domain/rules/context";
import { speciesProfiles } from "@/lib/domain/species";

const heat = (key: string) => RULE_PARAMETERS.heat.find((p) => p.key === key)!;
const oneZone = { zoneCount: 1, toOneZone: false };

describe("feeding load against the bin", () => {
  it("uses the heat rule's own heavy lines, not a copy", () => {
    // lib/domain/rules/params.ts heat.heavyFeedKgPerM2 and heat.heavyFeedKg: common practice (no published figure)
    expect(heat("heavyFeedKgPerM2").source).toBe("common practice");
    expect(HEAVY_FEED_KG_PER_M2).toBe(resolveRules(speciesProfiles["eisenia-fetida"]).heat.t.heavyFeedKgPerM2);
    expect(HEAVY_FEED_KG).toBe(resolveRules(speciesProfiles["eisenia-fetida"]).heat.t.heavyFeedKg);
  });

  it("15 kg on a 0.4 m² bin is 37.5 kg/m², heavy, and is said so before it is logged", () => {
    const load = loadForBin(15, { areaM2: 0.4, intervalDays: 21 }, oneZone)!;
    expect(load).toMatchObject({ sized: true, kgPerM2: 37.5, heavy: true });
    expect(load.times).toBeCloseTo(37.5 / HEAVY_FEED_KG_PER_M2, 10);
    const words = feedingLoadWords(load, "metric");
    expect(words.heavy).toBe(true);
    expect(words.lines[0]).toBe(
      `15 kg on 0.4 m² is 38 kg/m², heavy for this bin: a load this size can heat the bed. Spread it over ${Math.ceil(37.5 / HEAVY_FEED_KG_PER_M2)} feedings or a bigger area (under 1.6 kg at a time here).`,
    );
  });

  it("says it in lb/ft² on an imperial farm", () => {
    // 1 lb = 0.453 592 37 kg, 1 ft = 0.3048 m (international yard and pound, 1959): 37.5 kg/m² = 7.68 lb/ft²
    const load = loadForBin(15, { areaM2: 0.4, intervalDays: 21 }, oneZone)!;
    const line = feedingLoadWords(load, "imperial").lines[0]!;
    expect(line).toContain("33 lb on 4.3 ft² is 7.7 lb/ft²");
  });

  it("a light feeding is under the line and says so", () => {
    const load = loadForBin(1, { areaM2: 0.5, intervalDays: 21 }, oneZone)!;
    expect(load.heavy).toBe(false);
    expect(feedingLoadWords(load, "metric").lines[0]).toBe("1 kg on 0.5 m² is 2 kg/m², under the heat rule's heavy line of 4 kg/m².");
  });

  it("weighs a feeding to one zone against that zone's share, as the heat rule does", () => {
    const bin = { areaM2: 3, intervalDays: 21 };
    expect(loadForBin(6, bin, { zoneCount: 3, toOneZone: false })).toMatchObject({ kgPerM2: 2, heavy: false });
    const zone = loadForBin(6, bin, { zoneCount: 3, toOneZone: true })!;
    expect(zone).toMatchObject({ kgPerM2: 6, heavy: true, zoneShare: true });
    expect(feedingLoadWords(zone, "metric", "Fresh zone").lines[0]).toContain("6 kg on 1 m² (Fresh zone, its share of the bin) is 6 kg/m²");
  });

  it("agrees with the heat rule on every feeding: heavy here exactly when the rule arms its watch", () => {
    const t = resolveRules(speciesProfiles["eisenia-fetida"]).heat.t;
    fc.assert(
      fc.property(
        fc.double({ min: 0.01, max: 500, noNaN: true }),
        fc.integer({ min: 10, max: 1000 }),
        fc.integer({ min: 10, max: 1000 }),
        fc.integer({ min: 1, max: 6 }),
        fc.boolean(),
        (kg, lengthCm, widthCm, zoneCount, toOneZone) => {
          const mine = loadForBin(kg, { areaM2: floorAreaM2(lengthCm, widthCm), intervalDays: 21 }, { zoneCount, toOneZone })!;
          const rule = ruleLoad({ at: 0, zoneId: toOneZone ? "z" : null, totalKg: kg }, { bed: { lengthCm, widthCm, zoneCount } }, t);
          expect(mine.times).toBeCloseTo(rule.times, 9);
          expect(mine.heavy).toBe(rule.times >= 1);
        },
      ),
    );
  });

  it("without the bin's size, weighs the mass alone against the rule's no-size line", () => {
    const load = loadForBin(3, { areaM2: null, intervalDays: 21 }, oneZone)!;
    expect(load).toMatchObject({ sized: false, heavy: true, times: 3 / HEAVY_FEED_KG });
    expect(feedingLoadWords(load, "metric").lines[0]).toContain("heavy feeding for a bin of unknown size");
    expect(loadForBin(0, { areaM2: 1, intervalDays: 21 }, oneZone)).toBeNull();
    expect(loadForBin(Number.NaN, { areaM2: 1, intervalDays: 21 }, oneZone)).toBeNull();
  });

  it("an owner's own heavy line for the bin is used", () => {
    expect(loadForBin(15, { areaM2: 1, intervalDays: 21, heavyKgPerM2: 20 }, oneZone)).toMatchObject({ heavy: false, times: 0.75 });
  });

  it("the weekly feeding rate: 3 lb per ft² a week is 14.6 kg/m², and a bin fed over it is told", () => {
    // Worm Wizards (wormwizards.org), "Build one": "Multiply your square footage by 3" for lb of scraps a week
    expect(WEEKLY_RATE_KG_PER_M2).toBeCloseTo(14.647, 3);
    // 15 kg on 0.4 m² every 21 days = 12.5 kg/m² a week: under it; every 7 days = 37.5: over it
    expect(loadForBin(15, { areaM2: 0.4, intervalDays: 21 }, oneZone)).toMatchObject({ aboveWeeklyRate: false });
    const weekly = loadForBin(15, { areaM2: 0.4, intervalDays: 7 }, oneZone)!;
    expect(weekly).toMatchObject({ aboveWeeklyRate: true });
    expect(feedingLoadWords(weekly, "metric").lines[1]).toContain("38 kg/m² a week, more than a guide's 15 kg/m² a week (Worm Wizards");
  });

  it("the floor is length × width, unknown without either", () => {
    expect(floorAreaM2(60, 40)).toBeCloseTo(0.24, 10);
    expect(floorAreaM2(null, 40)).toBeNull();
    expect(floorAreaM2(60, 0)).toBeNull();
  });
});
