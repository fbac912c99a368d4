import { describe, expect, it } from "vitest";
import { ingredients } from "@/lib/domain/ingredients";
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
    // Rynk et al., On-Farm Composting Handbook, NRAES-54 (1992) App. A, via Missouri S&T (V-2nd)
    expect(byKey.get("corrugated-cardboard")).toMatchObject({ cn: 563, moisturePct: 8, nitrogenPct: 0.1 });
    // T. Richard, Cornell compost mix spreadsheet default: 45.6 % C / 2.4 % N, 81 % moisture (V-2nd)
    expect(byKey.get("cattle-manure")).toMatchObject({ carbonPct: 45.6, nitrogenPct: 2.4, moisturePct: 81 });
    // University of Illinois Extension, "Composting Horse Bedding": 70.3, 40 %, 0.79 % N (V)
    expect(byKey.get("horse-bedding")).toMatchObject({ cn: 70.3, moisturePct: 40, nitrogenPct: 0.79, sourceStatus: "V" });
    expect(byKey.get("water")).toMatchObject({ kind: "water", moisturePct: 100 });
  });

  it("every complete row works in a mix check", () => {
    for (const i of ingredients) {
      if (i.moisturePct === null || i.nitrogenPct === null || i.cn === null) continue;
      const item: MixItem = { name: i.name, massKg: 1, moisturePct: i.moisturePct, nitrogenPct: i.nitrogenPct, cn: i.cn };
      expect(checkMix([item]).ok, i.key).toBe(true);
    }
  });
});
