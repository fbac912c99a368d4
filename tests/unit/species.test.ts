import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { z } from "zod";
import { MOISTURE_BANDS, SPECIES_IDS, TEMPERATURE_BANDS, classifyMoisture, classifyTemperature, getSpecies, speciesProfiles } from "@/lib/domain/species";

const fetida = speciesProfiles["eisenia-fetida"];

describe("species profiles", () => {
  it("has a profile for every id, under its own id", () => {
    for (const id of SPECIES_IDS) expect(speciesProfiles[id].id).toBe(id);
    expect(Object.keys(speciesProfiles).sort()).toEqual([...SPECIES_IDS].sort());
  });

  it("works as a zod enum", () => {
    const schema = z.enum(SPECIES_IDS);
    expect(schema.parse("eudrilus-eugeniae")).toBe("eudrilus-eugeniae");
    expect(schema.safeParse("lumbricus-terrestris").success).toBe(false);
  });

  it("finds a profile by id and refuses an unknown one", () => {
    expect(getSpecies("perionyx-excavatus")?.name).toBe("Perionyx excavatus");
    expect(getSpecies("nope")).toBeNull();
    expect(getSpecies("toString")).toBeNull();
  });

  it.each(SPECIES_IDS)("%s: thresholds rise in order", (id) => {
    const { temperatureC: t, moisturePct: m, ph } = speciesProfiles[id];
    const temps = [t.lethalCold, t.coldStress, t.comfortLow, t.comfortHigh, t.warmStress, t.lethalHeat];
    expect([...temps].sort((a, b) => a - b)).toEqual(temps);
    expect(new Set(temps).size).toBe(temps.length);
    const moist = [m.lethalDry, m.comfortLow, m.comfortHigh, m.lethalWet];
    expect([...moist].sort((a, b) => a - b)).toEqual(moist);
    expect(m.lethalDry).toBeGreaterThanOrEqual(0);
    expect(m.lethalWet).toBeLessThanOrEqual(100);
    expect(ph.min < ph.comfortLow && ph.comfortLow < ph.comfortHigh && ph.comfortHigh < ph.max).toBe(true);
  });

  it("puts death at 35 °C for red wigglers", () => {
    // Loehr, Neuhauser & Malecki 1985, abstract: death at 35 °C; growth reduced at 30 °C
    expect(classifyTemperature(fetida, 35)).toBe("too hot");
    expect(classifyTemperature(fetida, 34.9)).toBe("hot");
    expect(classifyTemperature(fetida, 30)).toBe("hot");
    expect(classifyTemperature(fetida, 29.9)).toBe("warm");
  });

  it("calls 15–25 °C comfortable for red wigglers", () => {
    // NC State Extension, "Earthworms and Worm Bins": ideal 59–77 °F (15–25 °C)
    expect(classifyTemperature(fetida, 15)).toBe("comfortable");
    expect(classifyTemperature(fetida, 25)).toBe("comfortable");
    expect(classifyTemperature(fetida, 14.9)).toBe("cool");
    expect(classifyTemperature(fetida, 25.1)).toBe("warm");
    expect(classifyTemperature(fetida, 5)).toBe("cold");
    expect(classifyTemperature(fetida, -1)).toBe("too cold");
  });

  it("knows the tropical species die in cold a red wiggler survives", () => {
    // Domínguez & Edwards 2011 citing Viljoen & Reinecke: E. eugeniae and P. excavatus die below 9 °C
    expect(classifyTemperature(speciesProfiles["eudrilus-eugeniae"], 8)).toBe("too cold");
    expect(classifyTemperature(speciesProfiles["perionyx-excavatus"], 8)).toBe("too cold");
    expect(classifyTemperature(fetida, 8)).toBe("cold");
  });

  it("calls 70–90 % moisture comfortable for red wigglers", () => {
    // Kaplan et al. 1980 abstract: max weight gain from 70 %; Domínguez & Edwards 2011: fastest growth 80–90 %;
    // Loehr et al. 1985: best at 84–91 %; van Gestel et al. 1992: most cocoons at 85 % (issue 11)
    expect(classifyMoisture(fetida, 70)).toBe("comfortable");
    expect(classifyMoisture(fetida, 85)).toBe("comfortable");
    expect(classifyMoisture(fetida, 90)).toBe("comfortable");
    expect(classifyMoisture(fetida, 60)).toBe("dry");
    expect(classifyMoisture(fetida, 92)).toBe("wet");
    // Domínguez & Edwards 2011: epigeics survive from 50 %; past 93 % (2 points beyond Loehr's 91 %, common practice)
    expect(classifyMoisture(fetida, 49)).toBe("too dry");
    expect(classifyMoisture(fetida, 94)).toBe("too wet");
  });

  it("gives no band for a missing or impossible reading", () => {
    expect(classifyTemperature(fetida, Number.NaN)).toBeNull();
    expect(classifyMoisture(fetida, Number.NaN)).toBeNull();
    expect(classifyMoisture(fetida, 101)).toBeNull();
    expect(classifyMoisture(fetida, -1)).toBeNull();
  });

  it("bands never go down as the temperature or moisture goes up", () => {
    fc.assert(
      fc.property(fc.constantFrom(...SPECIES_IDS), fc.double({ min: -30, max: 70, noNaN: true }), fc.double({ min: 0, max: 40, noNaN: true }), (id, c, dc) => {
        const p = speciesProfiles[id];
        const a = classifyTemperature(p, c);
        const b = classifyTemperature(p, c + dc);
        expect(a && b && TEMPERATURE_BANDS.indexOf(a) <= TEMPERATURE_BANDS.indexOf(b)).toBe(true);
      }),
    );
    fc.assert(
      fc.property(fc.constantFrom(...SPECIES_IDS), fc.double({ min: 0, max: 100, noNaN: true }), fc.double({ min: 0, max: 100, noNaN: true }), (id, x, y) => {
        const p = speciesProfiles[id];
        const [lo, hi] = x <= y ? [x, y] : [y, x];
        const a = classifyMoisture(p, lo);
        const b = classifyMoisture(p, hi);
        expect(a && b && MOISTURE_BANDS.indexOf(a) <= MOISTURE_BANDS.indexOf(b)).toBe(true);
      }),
    );
  });
});
