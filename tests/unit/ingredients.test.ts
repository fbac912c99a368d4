import { describe, expect, it } from "vitest";
import { ingredientSourceWords, ingredients } from "@/lib/domain/ingredients";
import { checkMix, type MixItem } from "@/lib/domain/mix";

describe("ingredient library", () => {
  it("has unique kebab-case keys and a source on every row", () => {
    expect(new Set(ingredients.map((i) => i.key)).size).toBe(ingredients.length);
    for (const i of ingredients) {
      expect(i.key).toMatch(/^[a-z0-9]+(-[a-z0-9]+)*$/);
      expect(i.source.length).toBeGreaterThan(5);
      expect(["V", "V-2nd", "M", "gap"]).toContain(i.sourceStatus);
    }
  });

  it("keeps every value in range", () => {
    for (const i of ingredients) {
      for (const pct of [i.moisturePct, i.carbonPct, i.nitrogenPct]) {
        if (pct !== null) {
          expect(pct).toBeGreaterThanOrEqual(0);
          expect(pct).toBeLessThanOrEqual(100);
        }
      }
      if (i.cn !== null) expect(i.cn).toBeGreaterThan(0);
    }
  });

  it("carbon is %N × C:N wherever all three are given", () => {
    // Cornell Waste Management Institute, "C/N Ratio" page: %C = %N × C:N (F4)
    for (const i of ingredients) {
      if (i.carbonPct !== null && i.nitrogenPct !== null && i.cn !== null) {
        expect(i.carbonPct, i.key).toBeCloseTo(i.nitrogenPct * i.cn, 6);
      }
    }
  });

  it("matches the published table values", () => {
    const byKey = new Map(ingredients.map((i) => [i.key, i]));
    // Rynk et al., On-Farm Composting Handbook, NRAES-54 (1992) App. A, seen in a copy of its table (V-2nd)
    expect(byKey.get("corrugated-cardboard")).toMatchObject({ cn: 563, moisturePct: 8, nitrogenPct: 0.1 });
    // common practice (the figures were found only in a compost calculator, so no source is claimed)
    expect(byKey.get("cattle-manure")).toMatchObject({ carbonPct: 45.6, nitrogenPct: 2.4, moisturePct: 81, source: "common practice", sourceStatus: "M" });
    // University of Illinois Extension, "Composting Horse Bedding": 70.3, 40 %, 0.79 % N (V)
    expect(byKey.get("horse-bedding")).toMatchObject({ cn: 70.3, moisturePct: 40, nitrogenPct: 0.79, sourceStatus: "V" });
    expect(byKey.get("water")).toMatchObject({ kind: "water", moisturePct: 100 });
  });

  it("cites handbooks, papers and extension publications, never a calculator or a spreadsheet", () => {
    for (const i of ingredients) expect(`${i.source} ${i.note ?? ""}`, i.key).not.toMatch(/calculator|spreadsheet|Missouri S&T|Farmwest/i);
    expect(ingredients.find((i) => i.key === "straw")!.source).toBe(
      "On-Farm Composting Handbook (NRAES-54), Rynk et al. 1992, Appendix A table of raw materials",
    );
  });

  it("says where values come from in a keeper's words, not as status codes", () => {
    expect(ingredientSourceWords("University of Illinois Extension, 'Composting Horse Bedding'", "V")).toBe(
      "Checked against: University of Illinois Extension, 'Composting Horse Bedding'.",
    );
    expect(ingredientSourceWords("common practice", "M")).toBe("A usual value; not checked against a published table.");
    expect(ingredientSourceWords("X; %N common practice", "M")).toBe("A usual value; not checked against a published table (X; %N common practice).");
    expect(ingredientSourceWords("Our lab, May 2025", "farm")).toBe("Your farm's own: Our lab, May 2025.");
    for (const i of ingredients) expect(ingredientSourceWords(i.source, i.sourceStatus), i.key).not.toMatch(/read in the source|from memory|\(V(-2nd)?\)/);
  });

  it("every complete row works in a mix check", () => {
    for (const i of ingredients) {
      if (i.moisturePct === null || i.nitrogenPct === null || i.cn === null) continue;
      const item: MixItem = { name: i.name, massKg: 1, moisturePct: i.moisturePct, nitrogenPct: i.nitrogenPct, cn: i.cn };
      expect(checkMix([item]).ok, i.key).toBe(true);
    }
  });
});
