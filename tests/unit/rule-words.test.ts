// What the rules screen says each rule does, before its numbers (lib/domain/rules/summary.ts), and
// how it words where a default comes from.
import { describe, expect, it } from "vitest";
import { RULE_PARAMETERS, resolveRules } from "@/lib/domain/rules";
import { ruleInWords, sourceInWords } from "@/lib/domain/rules/summary";
import { speciesProfiles } from "@/lib/domain/species";
import { fromShown, toShown, unitLabel } from "@/components/rules/rule-units";

const rules = resolveRules(speciesProfiles["eisenia-fetida"], {});

describe("a rule in a keeper's words", () => {
  it("heat, with the red wiggler's defaults, in °C and in °F", () => {
    expect(ruleInWords("heat", rules.heat.t, "metric")).toBe(
      "Tells the crew when the bed stays above 25 °C for 10 min (heads-up), or at 30 °C or more (act now). " +
        "After a heavy feeding (4 kg or more per square metre of bed) it watches for 48 h, longer for heavier ones up to 96 h, " +
        "and gives a heads-up when the bed warms 1 °C an hour faster than it usually does at that hour over the last 3 days. " +
        "It settles once the bed has been back at or below 24.5 °C for 15 min.",
    );
    const imperial = ruleInWords("heat", rules.heat.t, "imperial");
    expect(imperial).toContain("above 77 °F for 10 min");
    expect(imperial).toContain("at 86 °F or more");
    // a rate has no 32° offset: 1 °C an hour is 1.8 °F an hour
    expect(imperial).toContain("warms 1.8 °F an hour faster");
    expect(imperial).not.toMatch(/°C/);
    // 4 kg/m² × 0.3048² m² per ft² ÷ 0.45359237 kg per lb = 0.819 lb/ft² (international yard and pound, 1959)
    expect(imperial).toContain("(0.82 lb or more per square foot of bed)");
    expect(imperial).not.toMatch(/\bkg\b|metre/);
  });

  it("a bin's own value changes the sentence", () => {
    expect(ruleInWords("heat", { ...rules.heat.t, headsUpAboveC: 27 }, "metric")).toMatch(/^Tells the crew when the bed stays above 27 °C/);
  });

  it("every kind has a sentence naming no internal key and no unfilled number", () => {
    for (const kind of Object.keys(RULE_PARAMETERS) as (keyof typeof RULE_PARAMETERS)[]) {
      for (const system of ["metric", "imperial"] as const) {
        const words = ruleInWords(kind, rules[kind].t, system);
        expect(words, kind).toMatch(/^Tells the crew|^With an ammonia probe/);
        expect(words, kind).not.toMatch(/undefined|NaN|[a-z][A-Z]/);
      }
    }
  });
});

describe("where a default comes from, for a keeper", () => {
  it("common practice and recalled figures say so plainly", () => {
    expect(sourceInWords("common practice")).toBe("A usual keepers' value; no published figure.");
    expect(sourceInWords("from memory: 12-bit digital probe")).toBe("12-bit digital probe. Not checked against the published source.");
    expect(sourceInWords("from memory: NIOSH REL for people, 25 ppm (NIOSH Pocket Guide to Chemical Hazards, ammonia; not verified)")).toBe(
      "NIOSH REL for people, 25 ppm (NIOSH Pocket Guide to Chemical Hazards, ammonia). Not checked against the published source.",
    );
    expect(sourceInWords("species: top of the comfortable band")).toBe("From the worm species: top of the comfortable band.");
  });

  it("no parameter's source reaches the screen as a bare 'from memory' or 'common practice'", () => {
    for (const specs of Object.values(RULE_PARAMETERS)) {
      for (const p of specs) expect(sourceInWords(p.source)).not.toMatch(/^(from memory|common practice|species:)/);
    }
  });
});

describe("a heavy-feed line typed on an imperial farm", () => {
  it("shows kg as lb and kg/m² as lb/ft², and stores what was typed back in metric", () => {
    expect(unitLabel("kg", "imperial")).toBe("lb");
    expect(unitLabel("kg/m²", "imperial")).toBe("lb/ft²");
    expect(unitLabel("kg/m²", "metric")).toBe("kg/m²");
    // 2 kg = 4.409 lb (1 lb = 0.45359237 kg)
    expect(toShown("heavyFeedKg", "kg", 2, "imperial")).toBeCloseTo(4.4092, 4);
    // 4 kg/m² = 0.8193 lb/ft² (1 ft = 0.3048 m)
    expect(toShown("heavyFeedKgPerM2", "kg/m²", 4, "imperial")).toBeCloseTo(0.8193, 4);
    expect(fromShown("heavyFeedKgPerM2", "kg/m²", 0.8193, "imperial")).toBeCloseTo(4, 3);
    expect(fromShown("heavyFeedKg", "kg", 10, "imperial")).toBeCloseTo(4.5359, 4);
    expect(fromShown("heavyFeedKg", "kg", 10, "metric")).toBe(10);
  });
});
