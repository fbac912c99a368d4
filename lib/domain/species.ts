// Species bands for alerts, charts and the Today page. Each band names its published source beside it;
// "V" = read in the source (an abstract where so marked), "V-2nd" = read only in a secondary copy,
// "from memory" = not verified, "common practice" = a keeper's rule with no source.
// Bounds read as: below lethalCold is "too cold", at or above lethalHeat is "too hot"
// (Loehr et al. 1985: death at 35 °C); moisture outside lethalDry–lethalWet is "too dry"/"too wet"
// (Domínguez & Edwards 2011: epigeics survive 50–90 %, both ends survivable).

import { SPECIES_IDS, type SpeciesId } from "./vocabulary";

export { SPECIES_IDS, type SpeciesId };

export type SpeciesProfile = {
  id: SpeciesId;
  name: string;
  commonName: string;
  temperatureC: {
    lethalCold: number;
    coldStress: number;
    comfortLow: number;
    comfortHigh: number;
    warmStress: number;
    lethalHeat: number;
  };
  /** Percent of wet mass. */
  moisturePct: { lethalDry: number; comfortLow: number; comfortHigh: number; lethalWet: number };
  ph: { min: number; comfortLow: number; comfortHigh: number; max: number };
};

// Kaplan et al. 1980 abstract: all worms died within a week below pH 5 or above 9, best weight
// gain near 7.0 (V); Domínguez & Edwards 2011: epigeics tolerate 5–9 (V-2nd).
const EPIGEIC_PH = {
  min: 5,
  comfortLow: 6, // common practice: a point either side of Kaplan's optimum of 7.0
  comfortHigh: 8, // common practice
  max: 9,
};

// The cold side of the two tropical species' bands.
const TROPICAL_COLD_SIDE = {
  lethalCold: 9, // Domínguez & Edwards 2011 citing Viljoen & Reinecke: die below 9 °C (V-2nd)
  coldStress: 15, // from memory; Reinecke et al. 1992: winter cold is the limiting factor (V)
  comfortLow: 20, // Loehr et al. 1985: best growth 20–25 °C (V)
};

// E. fetida moisture. The sources disagree on the wet side: Kaplan et al. 1980 found max weight gain
// at 70–85 % (V); Domínguez & Edwards 2011 give fastest growth at 80–90 % (V-2nd); Loehr et al. 1985
// best growth at 9–16 % total solids, i.e. 84–91 % moisture (V, V-comp); van Gestel et al. 1992 most
// cocoons at 85 % (V-2nd). Three of four put the optimum above 85 %, so the band runs to 90 % and a
// soggy heads-up never fires inside a published optimum. Domínguez & Edwards' 90 % survival limit is
// not taken as lethal: Loehr grew them best at 91 %. Act now 2 points past Loehr's 91 %, beyond a
// probe's error (common practice). Kaplan's 70 % stays the dry edge (no source puts it higher).
const FETIDA_MOISTURE = {
  lethalDry: 50, // Domínguez & Edwards 2011: epigeics survive 50–90 % (V-2nd)
  comfortLow: 70, // Kaplan et al. 1980: max weight gain at 70–85 % (V)
  comfortHigh: 90, // Domínguez & Edwards 2011: fastest growth 80–90 % (V-2nd); Loehr et al. 1985: to 91 % (V-comp)
  lethalWet: 93, // common practice: 2 points past Loehr et al. 1985's 91 %
};

export const speciesProfiles: Record<SpeciesId, SpeciesProfile> = {
  "eisenia-fetida": {
    id: "eisenia-fetida",
    name: "Eisenia fetida / Eisenia andrei",
    commonName: "red wiggler",
    temperatureC: {
      lethalCold: 0, // NC State Extension "Earthworms and Worm Bins": survive 0–35 °C with ≥10 cm bedding (V)
      coldStress: 10, // common practice: cold warning below 10 °C (no source)
      comfortLow: 15, // NC State Extension: ideal 15–25 °C (V)
      comfortHigh: 25, // NC State Extension (V); Loehr et al. 1985: best growth 20–25 °C (V)
      warmStress: 30, // Loehr et al. 1985: growth reduced at 30 °C (V)
      lethalHeat: 35, // Loehr et al. 1985: death at 35 °C (V)
    },
    moisturePct: FETIDA_MOISTURE,
    ph: EPIGEIC_PH,
  },
  "eisenia-hortensis": {
    id: "eisenia-hortensis",
    name: "Eisenia hortensis",
    commonName: "European nightcrawler",
    // A cooler worm than E. fetida: Domínguez & Edwards 2011, low-temperature optimum and less
    // tolerant of extremes (V-2nd); Loehr et al. 1985 put all five species' best growth at 20–25 °C (V).
    // Where they disagree the cooler source is taken for the top of the band (heat is this worm's danger).
    temperatureC: {
      // Cold-tolerance study, Am. Midl. Nat. 166(2) 2011: survived 1.5 °C better than E. fetida (V)
      lethalCold: 0, // from memory: freezing kills; no verified figure for this species
      coldStress: 8, // from memory
      comfortLow: 12, // from memory; Domínguez & Edwards 2011: low-temperature optimum (V-2nd)
      comfortHigh: 22, // common practice: below Loehr's 25 °C for a cooler worm (Domínguez & Edwards 2011, V-2nd)
      warmStress: 27, // common practice: under the 30 °C where Loehr et al. 1985 saw growth fall (V), for a less tolerant worm
      lethalHeat: 35, // Loehr et al. 1985: death at 35 °C, D. veneta among the five (V)
    },
    // Viljoen & Reinecke's moisture-tower study of D. veneta: preferred 67–84 % (V-2nd), in place of
    // E. fetida's band; survival limits of epigeics (Domínguez & Edwards 2011, V-2nd).
    moisturePct: { lethalDry: 50, comfortLow: 67, comfortHigh: 84, lethalWet: 90 },
    ph: EPIGEIC_PH,
  },
  "eudrilus-eugeniae": {
    id: "eudrilus-eugeniae",
    name: "Eudrilus eugeniae",
    commonName: "African nightcrawler",
    temperatureC: {
      ...TROPICAL_COLD_SIDE,
      comfortHigh: 25, // Loehr et al. 1985 (V); optimum ≈25 °C (Domínguez & Edwards, V-2nd)
      warmStress: 28, // from memory: a margin before the 30 °C die-off below
      // Domínguez & Edwards 2011: die above 30 °C (V-2nd); Loehr 1985 gives 35 °C (V). We take the lower.
      lethalHeat: 30,
    },
    moisturePct: {
      lethalDry: 50, // Domínguez & Edwards 2011, epigeics (V-2nd)
      comfortLow: 70, // Viljoen & Reinecke 1989: life cycle run at 70–80 % (V)
      comfortHigh: 82, // Viljoen & Reinecke: clitellates most frequent at 80–82 % (V)
      lethalWet: 90, // Domínguez & Edwards 2011, epigeics (V-2nd)
    },
    ph: EPIGEIC_PH,
  },
  "perionyx-excavatus": {
    id: "perionyx-excavatus",
    name: "Perionyx excavatus",
    commonName: "Indian blue worm",
    // Edwards, Domínguez & Neuhauser 1998, Biol. Fertil. Soils 27:155: growth kept accelerating up to
    // 30 °C (V-2nd), so a bed at 28 °C is comfortable; Loehr et al. 1985's 20–25 °C best growth (V) is
    // the older, narrower finding. Domínguez & Edwards 2011's "die above 30 °C" (V-2nd) is not taken:
    // Edwards et al. grew them well at 30 °C; Loehr et al. saw death at 35 °C (V).
    temperatureC: {
      ...TROPICAL_COLD_SIDE,
      comfortHigh: 30, // Edwards, Domínguez & Neuhauser 1998: growth accelerating up to 30 °C (V-2nd)
      warmStress: 32, // common practice: between the 30 °C growth optimum and the 35 °C die-off
      lethalHeat: 35, // Loehr et al. 1985: death at 35 °C (V)
    },
    // No moisture study of its own read: E. fetida's band as a proxy (from memory that they share it).
    moisturePct: FETIDA_MOISTURE,
    ph: EPIGEIC_PH,
  },
};

export function isSpeciesId(value: unknown): value is SpeciesId {
  return typeof value === "string" && (SPECIES_IDS as readonly string[]).includes(value);
}

export function getSpecies(id: string): SpeciesProfile | null {
  return isSpeciesId(id) ? speciesProfiles[id] : null;
}

/** Ordered from coldest to hottest, for legends and chart shading. */
export const TEMPERATURE_BANDS = ["too cold", "cold", "cool", "comfortable", "warm", "hot", "too hot"] as const;
export type TemperatureBand = (typeof TEMPERATURE_BANDS)[number];

/** Ordered from driest to wettest. */
export const MOISTURE_BANDS = ["too dry", "dry", "comfortable", "wet", "too wet"] as const;
export type MoistureBand = (typeof MOISTURE_BANDS)[number];

/** Band of a temperature in °C for this species; null when there is no usable reading. */
export function classifyTemperature(profile: SpeciesProfile, c: number): TemperatureBand | null {
  if (!Number.isFinite(c)) return null;
  const t = profile.temperatureC;
  if (c < t.lethalCold) return "too cold";
  if (c < t.coldStress) return "cold";
  if (c < t.comfortLow) return "cool";
  if (c <= t.comfortHigh) return "comfortable";
  if (c < t.warmStress) return "warm";
  if (c < t.lethalHeat) return "hot";
  return "too hot";
}

/** Band of a moisture content (percent wet basis) for this species; null when unusable. */
export function classifyMoisture(profile: SpeciesProfile, pct: number): MoistureBand | null {
  if (!Number.isFinite(pct) || pct < 0 || pct > 100) return null;
  const m = profile.moisturePct;
  if (pct < m.lethalDry) return "too dry";
  if (pct < m.comfortLow) return "dry";
  if (pct <= m.comfortHigh) return "comfortable";
  if (pct <= m.lethalWet) return "wet";
  return "too wet";
}
