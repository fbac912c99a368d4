// Starting values for the ingredient library, from the published tables each row names (Rynk et al.,
// On-Farm Composting Handbook, NRAES-54 (1992), App. A; Cornell Waste Management Institute, "Compost
// Chemistry"; U. Illinois "Composting Horse Bedding"). C and N are % of dry mass, moisture % wet basis.
// Where a source gives only C:N and %N, carbon is %N × C:N (Cornell "C/N Ratio", F4).
// A row cites a handbook, a paper or an extension publication, never a calculator's web page: values
// that were only found in online calculators or spreadsheets are "common practice" (status M).
// sourceStatus is the weakest status among a row's numbers:
//   V = read in the source; V-2nd = seen only in a copy of the source's table; M = a usual value,
//   not checked against a published table; gap = no published value found (measure it, or use a
//   supplier's analysis). ingredientSourceWords says each to a keeper.
// Every row the library offers has moisture, carbon and nitrogen, so the mix check always runs on it;
// a row with no published value is kept (old feedings may name it) but `excluded` and never offered:
// the keeper adds their supplier's analysis as the farm's own ingredient instead.
// Published values spread widely (coffee grounds C:N 12 vs 20): keepers override per batch.

export type IngredientKind = "bedding" | "feedstock" | "water";
export type SourceStatus = "V" | "V-2nd" | "M" | "gap";

export type Ingredient = {
  key: string;
  name: string;
  kind: IngredientKind;
  moisturePct: number | null;
  carbonPct: number | null;
  nitrogenPct: number | null;
  cn: number | null;
  source: string;
  sourceStatus: SourceStatus;
  note?: string;
  /** Why the library does not offer it (no published value); the form offers only rows without it. */
  excluded?: string;
};

const RYNK = "On-Farm Composting Handbook (NRAES-54), Rynk et al. 1992, Appendix A table of raw materials";
const COMMON = "common practice";
const CORNELL_CHEM = "Cornell Waste Management Institute, 'Compost Chemistry' (c. 1996)";
const NO_VALUE = "No published value verified";
const NOT_OFFERED = "No published moisture, carbon and nitrogen: add your supplier's analysis, or your own measurement, as your farm's own ingredient.";

export const ingredients: readonly Ingredient[] = [
  {
    key: "corrugated-cardboard",
    name: "Corrugated cardboard",
    kind: "bedding",
    moisturePct: 8,
    carbonPct: 56.3,
    nitrogenPct: 0.1,
    cn: 563,
    source: RYNK,
    sourceStatus: "V-2nd",
    note: "Cornell gives 560 for newspaper and corrugated cardboard (V).",
  },
  {
    key: "newsprint",
    name: "Newsprint (shredded newspaper)",
    kind: "bedding",
    moisturePct: 5.5,
    carbonPct: 62.5,
    nitrogenPct: 0.1,
    cn: 625,
    source: COMMON,
    sourceStatus: "M",
    note: "The On-Farm Composting Handbook's table gives a range: C:N 398–852, moisture 3–8 %.",
  },
  {
    key: "mixed-paper",
    name: "Mixed paper",
    kind: "bedding",
    moisturePct: 19,
    carbonPct: 39.375,
    nitrogenPct: 0.225,
    cn: 175,
    source: `${CORNELL_CHEM}: C:N 150–200 (midpoint); ${RYNK}, paper from domestic refuse: moisture 18–20 %, 0.2–0.25 % N (midpoints); %C derived (C:N × %N)`,
    sourceStatus: "V-2nd",
    note: "The handbook's paper from domestic refuse has C:N 127–178. Office paper specifically has no verified value.",
  },
  {
    key: "straw",
    name: "Straw",
    kind: "bedding",
    moisturePct: 12,
    carbonPct: 56,
    nitrogenPct: 0.7,
    cn: 80,
    source: RYNK,
    sourceStatus: "V-2nd",
    note: "The handbook's range: C:N 48–150, moisture 4–27 %; wheat straw 127. Cornell: 40–100.",
  },
  {
    key: "autumn-leaves",
    name: "Autumn leaves",
    kind: "bedding",
    moisturePct: 38,
    carbonPct: 48.6,
    nitrogenPct: 0.9,
    cn: 54,
    source: RYNK,
    sourceStatus: "V-2nd",
    note: "The handbook's range: C:N 40–80. Cornell: 30–80.",
  },
  {
    key: "sawdust",
    name: "Sawdust",
    kind: "bedding",
    moisturePct: 39,
    carbonPct: 88.4,
    nitrogenPct: 0.2,
    cn: 442,
    source: RYNK,
    sourceStatus: "V-2nd",
    note: "C:N 442 with 0.2 % N implies 88 % carbon, more than wood holds: the two figures do not agree; enter your own N. The handbook's range: C:N 200–750, moisture 19–65 %.",
  },
  {
    key: "horse-bedding",
    name: "Used horse bedding (shavings)",
    kind: "bedding",
    moisturePct: 40,
    carbonPct: 55.537,
    nitrogenPct: 0.79,
    cn: 70.3,
    source: "University of Illinois Extension, 'Composting Horse Bedding'",
    sourceStatus: "V",
  },
  {
    key: "peat-moss",
    name: "Peat moss",
    kind: "bedding",
    moisturePct: null,
    carbonPct: null,
    nitrogenPct: null,
    cn: null,
    source: NO_VALUE,
    sourceStatus: "gap",
    note: "A C:N of 58 circulates in lists without a source; no moisture or nitrogen was found.",
    excluded: NOT_OFFERED,
  },
  {
    key: "coconut-coir",
    name: "Coconut coir",
    kind: "bedding",
    moisturePct: null,
    carbonPct: null,
    nitrogenPct: null,
    cn: null,
    source: NO_VALUE,
    sourceStatus: "gap",
    note: "Measure it, or use the supplier's analysis.",
    excluded: NOT_OFFERED,
  },
  {
    key: "vegetable-scraps",
    name: "Vegetable scraps",
    kind: "feedstock",
    moisturePct: 87,
    carbonPct: 51.3,
    nitrogenPct: 2.7,
    cn: 19,
    source: `${RYNK}; %N common practice`,
    sourceStatus: "M",
    note: "Cornell: vegetable scraps 15–20.",
  },
  {
    key: "fruit-waste",
    name: "Fruit waste",
    kind: "feedstock",
    moisturePct: 80,
    carbonPct: 56,
    nitrogenPct: 1.4,
    cn: 40,
    // %N 1.4 is recalled from the same handbook table (typical of 0.9–2.6), not read in it: status M.
    source: `${RYNK} (C:N, moisture); %N common practice; %C derived (C:N × %N)`,
    sourceStatus: "M",
    note: "The handbook's range: C:N 20–49, moisture 62–88 %.",
  },
  {
    key: "coffee-grounds",
    name: "Coffee grounds",
    kind: "feedstock",
    moisturePct: 80,
    carbonPct: 40,
    nitrogenPct: 2,
    cn: 20,
    source: `${CORNELL_CHEM} (C:N); moisture and %N common practice`,
    sourceStatus: "M",
    note: "S. Solomon, Organic Gardener's Composting, gives C:N ≈12.",
  },
  {
    key: "grass-clippings",
    name: "Grass clippings",
    kind: "feedstock",
    moisturePct: 82,
    carbonPct: 68,
    nitrogenPct: 4,
    cn: 17,
    source: `${RYNK} (C:N, moisture); %N common practice`,
    sourceStatus: "M",
    note: "C:N 17 with 4 % N implies 68 % carbon, high for plant matter: the two figures come from different tables. Cornell: C:N 15–25; a measured sample was 77 % moisture.",
  },
  {
    key: "cattle-manure",
    name: "Cattle manure",
    kind: "feedstock",
    moisturePct: 81,
    carbonPct: 45.6,
    nitrogenPct: 2.4,
    cn: 19,
    source: COMMON,
    sourceStatus: "M",
  },
  {
    key: "horse-manure",
    name: "Horse manure",
    kind: "feedstock",
    moisturePct: 75,
    carbonPct: 45,
    nitrogenPct: 2,
    cn: 22.5,
    source: "University of Illinois Extension, 'Composting Horse Bedding': C:N 20–25, moisture 70–80 % (midpoints shown), 2.0 % N",
    sourceStatus: "V",
    note: "Other tables give C:N 30, moisture 72 %, 1.6 % N.",
  },
  {
    key: "horse-manure-straw",
    name: "Horse manure with straw bedding",
    kind: "feedstock",
    moisturePct: 67,
    carbonPct: 40.5,
    nitrogenPct: 1.5,
    cn: 27,
    source: COMMON,
    sourceStatus: "M",
  },
  {
    key: "water",
    name: "Water",
    kind: "water",
    moisturePct: 100,
    carbonPct: null,
    nitrogenPct: null,
    cn: null,
    source: "Definition",
    sourceStatus: "V",
  },
];

/** The rows the library offers in the feeding form: all three values, none excluded. */
export const offeredIngredients: readonly Ingredient[] = ingredients.filter((i) => !i.excluded);

/** Whether a row of the ingredients table may be offered in the feeding form: a farm's own always
 * (the form asks for what it lacks); the shared library's only with moisture, nitrogen and carbon or
 * C:N, and not marked as having no published value. */
export function isOffered(row: {
  farmId: string | null;
  sourceStatus: string | null;
  moisturePct: number | null;
  carbonPct: number | null;
  nitrogenPct: number | null;
  cn: number | null;
}): boolean {
  if (row.farmId !== null) return true;
  if (row.sourceStatus === "gap") return false;
  return row.moisturePct != null && row.nitrogenPct != null && (row.carbonPct != null || row.cn != null);
}

/** Where an ingredient's values come from, worded for a keeper: "Checked against: …", "A usual
 * value; not checked against a published table", and so on. */
export function ingredientSourceWords(source: string, status: string | null): string {
  const usual = "A usual value; not checked against a published table";
  switch (status) {
    case "V":
      return `Checked against: ${source}.`;
    case "V-2nd":
      return `Checked against a copy of: ${source}.`;
    case "M":
      return source === COMMON ? `${usual}.` : `${usual} (${source}).`;
    case "gap":
      return "No published value: measure it, or use the supplier's analysis.";
    case "farm":
      return `Your farm's own: ${source}.`;
    default:
      return source;
  }
}
