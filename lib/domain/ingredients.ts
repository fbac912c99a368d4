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
};

const RYNK = "On-Farm Composting Handbook (NRAES-54), Rynk et al. 1992, Appendix A table of raw materials";
const COMMON = "common practice";
const CORNELL_CHEM = "Cornell Waste Management Institute, 'Compost Chemistry' (c. 1996)";

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
    moisturePct: null,
    carbonPct: null,
    nitrogenPct: null,
    cn: 175,
    source: `${CORNELL_CHEM}: 150–200 (midpoint shown)`,
    sourceStatus: "V",
    note: "No published moisture or nitrogen found; office paper specifically has no verified value.",
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
    cn: 58,
    source: COMMON,
    sourceStatus: "M",
  },
  {
    key: "coconut-coir",
    name: "Coconut coir",
    kind: "bedding",
    moisturePct: null,
    carbonPct: null,
    nitrogenPct: null,
    cn: null,
    source: "No published value verified",
    sourceStatus: "gap",
    note: "Measure it, or use the supplier's analysis.",
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
    carbonPct: null,
    nitrogenPct: null,
    cn: 40,
    source: RYNK,
    sourceStatus: "V-2nd",
    note: "The handbook's range: C:N 20–49, moisture 62–88 %. No %N found.",
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
