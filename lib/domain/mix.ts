// Mix check: moisture and C:N of a planned feeding, and how much of one more ingredient brings
// the mix to a target. Q = as-is (wet) mass, M = moisture % wet basis, C and N = % of dry mass,
// exactly as Cornell Waste Management Institute defines them (Richard & Trautmann).
//   F1  M_mix = Σ Q·M / Σ Q
//   F2  Q_add = (G·ΣQ − ΣQ·M) / (M_add − G), G strictly between the mix and the addition
//   F3  C:N_mix = Σ Q·C·(100 − M) / Σ Q·N·(100 − M)
//   F4  %C = %N × C:N
//   F5  Q_add = (R·Σ Q·N·(100 − M) − Σ Q·C·(100 − M)) / ((100 − M_add)·(C_add − R·N_add))
import { fail, ok, type Result } from "./result";

export type MixItem = {
  name?: string;
  massKg: number;
  moisturePct: number;
  /** % of dry mass; give this with nitrogenPct, or give cn instead. */
  carbonPct?: number;
  /** % of dry mass. */
  nitrogenPct?: number;
  /** C:N by mass, dry basis; with nitrogenPct it gives carbonPct (F4). */
  cn?: number;
};

/** An ingredient to add, before its mass is known. */
export type Amendment = Omit<MixItem, "massKg">;

export const WATER: Amendment = { name: "water", moisturePct: 100 };

export type Range = { low: number; high: number };
export type MixTarget = { moisturePct: Range; cn: Range };

// The one line below which a feeding is "rich in nitrogen", shared by the mix check and the ammonia
// estimate (lib/domain/rules/params.ts): Rynk et al., On-Farm Composting Handbook NRAES-54 Table 2.1,
// low end of the preferred C:N 25–30 (V-2nd); Cornell "Compost Chemistry": below ~30:1 the extra
// nitrogen leaves as ammonia (V). Taken over the table's "reasonable" 20, where ammonia already goes.
export const NITROGEN_RICH_CN = 25;

// Worm beds (70–91 %: Kaplan et al. 1980, Loehr et al. 1985, V) are far wetter than hot compost
// (50–60 %, Rynk et al. NRAES-54 Table 2.1, V-2nd); keep the two apart.
export const WORM_BED_TARGET: MixTarget = {
  // Kaplan et al. 1980: E. fetida max weight gain at 70–85 % moisture (V)
  moisturePct: { low: 70, high: 85 },
  // Low end: the shared nitrogen-rich line above. High end: Rynk et al. NRAES-54 Table 2.1
  // "reasonable" C:N up to 40 for composting (V-2nd), used for worm beds as common practice.
  cn: { low: NITROGEN_RICH_CN, high: 40 },
};

export const MIX_VERDICTS = ["balanced", "too rich in nitrogen", "too wet", "too dry", "too rich in carbon"] as const;
export type MixVerdict = (typeof MIX_VERDICTS)[number];

export type MixCheck = {
  totalMassKg: number;
  dryMassKg: number;
  waterKg: number;
  carbonKg: number;
  nitrogenKg: number;
  moisturePct: number;
  /** null when the mix has no dry matter (water only). */
  cn: number | null;
  /** The first issue by urgency, or "balanced". Ammonia is lethal (Kaplan 1980), so it comes first. */
  verdict: MixVerdict;
  issues: Exclude<MixVerdict, "balanced">[];
};

type Checked = { massKg: number; moisturePct: number; carbonPct: number | null; nitrogenPct: number | null };

const finite = (x: unknown): x is number => typeof x === "number" && Number.isFinite(x);

function checkPercent(value: unknown, field: string, label: string): Result<number> {
  if (!finite(value)) return fail(field, `${label} must be a number.`);
  if (value < 0 || value > 100) return fail(field, `${label} must be between 0 and 100 %.`);
  return ok(value);
}

/** Validates one ingredient; `needCn` asks for carbon and nitrogen as well. */
function checkItem(item: Amendment & { massKg?: number }, field: string, needCn: boolean): Result<Checked> {
  const massKg = item.massKg ?? 0;
  if (!finite(massKg)) return fail(`${field}.massKg`, "Mass must be a number.");
  if (massKg < 0) return fail(`${field}.massKg`, "Mass cannot be negative.");
  const m = checkPercent(item.moisturePct, `${field}.moisturePct`, "Moisture");
  if (!m.ok) return m;
  const moisturePct = m.value;
  // Pure water carries no dry matter, so no carbon or nitrogen is needed.
  if (!needCn || moisturePct === 100) return ok({ massKg, moisturePct, carbonPct: null, nitrogenPct: null });

  if (item.nitrogenPct === undefined) return fail(`${field}.nitrogenPct`, "Nitrogen (% of dry mass) is needed for C:N.");
  const n = checkPercent(item.nitrogenPct, `${field}.nitrogenPct`, "Nitrogen");
  if (!n.ok) return n;
  if (n.value === 0) return fail(`${field}.nitrogenPct`, "Nitrogen cannot be zero: C:N would be infinite.");

  let carbonPct: number;
  if (item.carbonPct !== undefined) {
    const c = checkPercent(item.carbonPct, `${field}.carbonPct`, "Carbon");
    if (!c.ok) return c;
    carbonPct = c.value;
  } else if (item.cn !== undefined) {
    if (!finite(item.cn) || item.cn <= 0) return fail(`${field}.cn`, "C:N must be a number above zero.");
    carbonPct = item.cn * n.value;
    if (carbonPct > 100) {
      return fail(`${field}.cn`, `C:N ${item.cn} with ${n.value} % nitrogen means more than 100 % carbon.`);
    }
  } else {
    return fail(`${field}.carbonPct`, "Give carbon (% of dry mass) or a C:N ratio.");
  }
  return ok({ massKg, moisturePct, carbonPct, nitrogenPct: n.value });
}

function checkItems(items: readonly MixItem[], needCn: boolean): Result<Checked[]> {
  if (!Array.isArray(items) || items.length === 0) return fail("items", "Add at least one ingredient.");
  const out: Checked[] = [];
  for (const [i, item] of items.entries()) {
    const r = checkItem(item, `items.${i}`, needCn);
    if (!r.ok) return r;
    out.push(r.value);
  }
  if (out.reduce((s, x) => s + x.massKg, 0) <= 0) return fail("items", "The mix has no mass.");
  return ok(out);
}

type Totals = { mass: number; water: number; dry: number; carbon: number; nitrogen: number };

function totals(items: readonly Checked[]): Totals {
  const t: Totals = { mass: 0, water: 0, dry: 0, carbon: 0, nitrogen: 0 };
  for (const x of items) {
    const dry = (x.massKg * (100 - x.moisturePct)) / 100;
    t.mass += x.massKg;
    t.water += (x.massKg * x.moisturePct) / 100;
    t.dry += dry;
    t.carbon += (dry * (x.carbonPct ?? 0)) / 100;
    t.nitrogen += (dry * (x.nitrogenPct ?? 0)) / 100;
  }
  return t;
}

/** F1: moisture of the mix, % wet basis. Needs no carbon or nitrogen. */
export function mixMoisture(items: readonly MixItem[]): Result<number> {
  const checked = checkItems(items, false);
  if (!checked.ok) return checked;
  const t = totals(checked.value);
  return ok((t.water / t.mass) * 100);
}

/** F3: C:N of the mix on dry matter. */
export function mixCarbonToNitrogen(items: readonly MixItem[]): Result<number> {
  const checked = checkItems(items, true);
  if (!checked.ok) return checked;
  const t = totals(checked.value);
  if (t.nitrogen <= 0) return fail("items", "The mix has no dry matter, so it has no C:N.");
  return ok(t.carbon / t.nitrogen);
}

/** Moisture, C:N and a verdict for a worm bed (or another target). */
export function checkMix(items: readonly MixItem[], target: MixTarget = WORM_BED_TARGET): Result<MixCheck> {
  const checked = checkItems(items, true);
  if (!checked.ok) return checked;
  const t = totals(checked.value);
  const moisturePct = (t.water / t.mass) * 100;
  const cn = t.nitrogen > 0 ? t.carbon / t.nitrogen : null;
  const issues: MixCheck["issues"] = [];
  if (cn !== null && cn < target.cn.low) issues.push("too rich in nitrogen");
  if (moisturePct > target.moisturePct.high) issues.push("too wet");
  if (moisturePct < target.moisturePct.low) issues.push("too dry");
  if (cn !== null && cn > target.cn.high) issues.push("too rich in carbon");
  return ok({
    totalMassKg: t.mass,
    dryMassKg: t.dry,
    waterKg: t.water,
    carbonKg: t.carbon,
    nitrogenKg: t.nitrogen,
    moisturePct,
    cn,
    verdict: issues[0] ?? "balanced",
    issues,
  });
}

/** An item the mix check could not count yet, and what it needs, in a keeper's words. */
export type MixWaiting = { index: number; field: string; message: string };
/** The check over every item whose values are known; the others wait, each saying what it lacks. */
export type MixAsFarAsKnown = { check: MixCheck | null; counted: number[]; waiting: MixWaiting[] };

const missing = (v: unknown) => v === undefined || (typeof v === "number" && Number.isNaN(v));

/** What an item lacks, asked for in plain words, or null when nothing is missing (a value may still be wrong). */
function askFor(item: MixItem): { field: string; message: string } | null {
  if (missing(item.massKg)) return { field: "massKg", message: "type its mass." };
  if (missing(item.moisturePct)) return { field: "moisturePct", message: "give its moisture (the % of its weight that is water)." };
  if (item.moisturePct === 100) return null;
  if (missing(item.nitrogenPct)) return { field: "nitrogenPct", message: "give its nitrogen (% of dry mass), from the supplier's analysis or a lab report." };
  if (missing(item.carbonPct) && missing(item.cn)) return { field: "cn", message: "give its C:N (or its carbon, % of dry mass)." };
  return null;
}

/**
 * The mix check for a form being filled in: it runs over the items whose values are known, and
 * names each other item with what it needs, so one blank field never hides the whole check.
 * An item left out changes the answer: the form says which items are not counted yet.
 */
export function checkMixAsFarAsKnown(items: readonly MixItem[], target: MixTarget = WORM_BED_TARGET): MixAsFarAsKnown {
  const counted: number[] = [];
  const waiting: MixWaiting[] = [];
  items.forEach((item, index) => {
    const ask = askFor(item);
    if (ask) return waiting.push({ index, field: `items.${index}.${ask.field}`, message: ask.message });
    const r = checkItem(item, `items.${index}`, true);
    if (!r.ok) return waiting.push({ index, ...r.error });
    if (r.value.massKg > 0) counted.push(index);
  });
  const result = counted.length
    ? checkMix(
        counted.map((i) => items[i]!),
        target,
      )
    : null;
  return { check: result?.ok ? result.value : null, counted, waiting };
}

/** F2, for a whole mix: kg of `amendment` (a dry bedding, or WATER) that brings it to the target moisture. */
export function amendmentForMoisture(items: readonly MixItem[], amendment: Amendment, targetPct: number): Result<number> {
  const checked = checkItems(items, false);
  if (!checked.ok) return checked;
  const a = checkItem(amendment, "amendment", false);
  if (!a.ok) return a;
  const g = checkPercent(targetPct, "targetMoisturePct", "Target moisture");
  if (!g.ok) return g;
  const t = totals(checked.value);
  const current = (t.water / t.mass) * 100;
  const numerator = (g.value * t.mass) / 100 - t.water;
  if (Math.abs(numerator) < 1e-12 * t.mass) return ok(0);
  const denominator = (a.value.moisturePct - g.value) / 100;
  const q = numerator / denominator;
  if (denominator === 0 || !Number.isFinite(q) || q < 0) {
    return fail(
      "targetMoisturePct",
      `Adding ${amendment.name ?? "this ingredient"} (${a.value.moisturePct} %) cannot move the mix from ${current.toFixed(1)} % to ${g.value} %.`,
    );
  }
  return ok(q);
}

/** F5, for a whole mix: kg of `bedding` that brings the mix to the target C:N. */
export function beddingForCn(items: readonly MixItem[], bedding: Amendment, targetCn: number): Result<number> {
  const checked = checkItems(items, true);
  if (!checked.ok) return checked;
  const b = checkItem(bedding, "bedding", true);
  if (!b.ok) return b;
  if (!finite(targetCn) || targetCn <= 0) return fail("targetCn", "Target C:N must be a number above zero.");
  const { carbonPct, nitrogenPct, moisturePct } = b.value;
  if (carbonPct === null || nitrogenPct === null) {
    return fail("bedding.moisturePct", "Pure water has no dry matter and cannot change C:N.");
  }
  const t = totals(checked.value);
  const numerator = targetCn * t.nitrogen - t.carbon;
  if (Math.abs(numerator) < 1e-12 * (t.carbon + t.nitrogen)) return ok(0);
  const dryFraction = (100 - moisturePct) / 100;
  const denominator = (dryFraction * (carbonPct - targetCn * nitrogenPct)) / 100;
  const q = numerator / denominator;
  if (denominator === 0 || !Number.isFinite(q) || q < 0) {
    const now = t.nitrogen > 0 ? (t.carbon / t.nitrogen).toFixed(1) : "undefined";
    return fail(
      "targetCn",
      `${bedding.name ?? "This bedding"} (C:N ${(carbonPct / nitrogenPct).toFixed(0)}) cannot move the mix from C:N ${now} to ${targetCn}.`,
    );
  }
  return ok(q);
}
