import { describe, expect, it } from "vitest";
import { ingredientSourceWords, ingredients, isOffered, offeredIngredients } from "@/lib/domain/ingredients";
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

  it("every row the library offers has moisture, carbon and nitrogen, and works in a mix check; the rest are excluded", () => {
    for (const i of ingredients) {
      if (i.kind === "water") continue;
      if (i.excluded) {
        // excluded = no published value: status "gap", no numbers, never offered
        expect(i, i.key).toMatchObject({ sourceStatus: "gap", moisturePct: null, carbonPct: null, nitrogenPct: null });
        expect(offeredIngredients, i.key).not.toContain(i);
        continue;
      }
      expect([i.moisturePct, i.carbonPct, i.nitrogenPct, i.cn], i.key).not.toContain(null);
      expect(i.sourceStatus, i.key).not.toBe("gap");
      const item: MixItem = { name: i.name, massKg: 1, moisturePct: i.moisturePct!, nitrogenPct: i.nitrogenPct!, carbonPct: i.carbonPct! };
      expect(checkMix([item]).ok, i.key).toBe(true);
      expect(isOffered({ ...i, farmId: null }), i.key).toBe(true);
    }
  });

  it("the ingredients a keeper found missing: fruit waste, mixed paper offered with sources; peat moss and coconut coir excluded", () => {
    const byKey = new Map(ingredients.map((i) => [i.key, i]));
    // Rynk et al. NRAES-54 App. A, fruit wastes: C:N 40, moisture 80 % (V-2nd); %N 1.4 from memory (so status M); %C derived
    expect(byKey.get("fruit-waste")).toMatchObject({ cn: 40, moisturePct: 80, nitrogenPct: 1.4, carbonPct: 56, sourceStatus: "M" });
    expect(byKey.get("fruit-waste")!.source).toMatch(/%N common practice.*derived/);
    // Cornell "Compost Chemistry": mixed paper 150–200 (V); Rynk App. A paper from domestic refuse: 18–20 %, 0.2–0.25 % N (V-2nd)
    expect(byKey.get("mixed-paper")).toMatchObject({ cn: 175, moisturePct: 19, nitrogenPct: 0.225, sourceStatus: "V-2nd" });
    expect(byKey.get("mixed-paper")!.source).toMatch(/Cornell.*domestic refuse.*derived/);
    // no published moisture, carbon and nitrogen found for coconut coir; peat moss's C:N 58 only from an unattributed list
    expect(byKey.get("coconut-coir")!.excluded).toMatch(/supplier's analysis/);
    expect(byKey.get("peat-moss")!.excluded).toMatch(/supplier's analysis/);
  });

  it("the feeding form offers a farm's own ingredient even with a value missing, and no library row without values", () => {
    const row = { farmId: null, sourceStatus: "V", moisturePct: 80, carbonPct: null, nitrogenPct: 1, cn: 20 };
    expect(isOffered(row)).toBe(true);
    expect(isOffered({ ...row, nitrogenPct: null })).toBe(false);
    expect(isOffered({ ...row, sourceStatus: "gap" })).toBe(false);
    // a database seeded before this change still holds peat moss's old C:N: its status says gap, so it is not offered
    expect(isOffered({ ...row, sourceStatus: "gap", moisturePct: null, nitrogenPct: null, cn: 58 })).toBe(false);
    expect(isOffered({ ...row, farmId: "f1", moisturePct: 70, nitrogenPct: null, cn: null })).toBe(true);
  });
});
