"use client";

import { useEffect, useMemo, useRef, useState } from "react";
import { MixVerdictMark } from "@/components/logbook/mix-verdict";
import { zoneWords } from "@/components/logbook/format";
import { useIngredients } from "@/lib/client/hooks/use-ingredients";
import { useBin } from "@/lib/client/hooks/use-bin";
import type { IngredientRow, LoggedFeeding, ZoneChoice } from "@/lib/client/wire";
import Link from "next/link";
import { amendmentForMoisture, beddingForCn, checkMixAsFarAsKnown, WATER, WORM_BED_TARGET, type Amendment, type MixItem } from "@/lib/domain/mix";
import { feedingLoadWords, floorAreaM2, loadForBin, type BinForLoad } from "@/lib/domain/feeding-load";
import { failureOf } from "@/lib/client/fetcher";
import { SAVED_ON_PHONE, sendOrKeep } from "@/lib/client/use-send";
import { useBinRefresh } from "@/lib/client/revalidate";
import { feedingsKey } from "@/lib/client/swr-keys";
import { formatMass, formatNumber, massToKg, UNIT_LABELS, type UnitSystem } from "@/lib/domain/units";
import { LogStatus } from "@/components/ui/form-parts";
import { Mark } from "@/components/ui/marks";
import { ingredients as published, ingredientSourceWords, isOffered } from "@/lib/domain/ingredients";
import { CASTINGS_NOT_FOOD, LOCAL_CODES, WASH_HANDS } from "@/lib/domain/safety-words";

type Row = {
  key: number;
  ingredientId: string | null;
  name: string;
  source: string | null;
  sourceStatus: string | null;
  mass: string;
  moisture: string;
  nitrogen: string;
  cn: string;
};
type Field = "name" | "massKg" | "moisturePct" | "nitrogenPct" | "cn";

// The middle of the worm-bed moisture band, and a C:N inside the band at the ammonia rule's risk line
// (lib/domain/rules/params.ts riskCnBelow 25; Cornell: below ~30:1 excess nitrogen goes off as ammonia).
const MOISTURE_AIM = Math.round((WORM_BED_TARGET.moisturePct.low + WORM_BED_TARGET.moisturePct.high) / 2);
const CN_AIM = 25;

const text = (n: number | null | undefined) => (n == null || !Number.isFinite(n) ? "" : String(n));
/** A typed number: decimal comma allowed; empty is NaN. */
const num = (s: string) => (s.trim() === "" ? NaN : Number(s.trim().replace(",", ".")));
const opt = (s: string) => (s.trim() === "" ? undefined : num(s));
const orNull = (n: number | undefined) => (n === undefined || !Number.isFinite(n) ? null : n);

function cnOf(i: IngredientRow) {
  if (i.cn != null) return i.cn;
  return i.carbonPct != null && i.nitrogenPct ? i.carbonPct / i.nitrogenPct : null;
}

const complete = (i: IngredientRow) => i.moisturePct != null && i.nitrogenPct != null && cnOf(i) != null;
const amendmentOf = (i: IngredientRow): Amendment => ({ name: i.name, moisturePct: i.moisturePct!, nitrogenPct: i.nitrogenPct!, cn: cnOf(i)! });

let nextKey = 1;

// Library rows with no published value, named so a keeper knows why they are not offered.
const NOT_OFFERED = published.filter((i) => i.excluded).map((i) => i.name);

export function FeedingForm({
  farmId,
  binId,
  zones,
  defaultZoneId,
  system,
  bin,
}: {
  farmId: string;
  binId: string;
  zones: ZoneChoice[];
  defaultZoneId: string | null;
  system: UnitSystem;
  /** The bin's floor and feeding interval, to weigh a feeding against the bin; without it the form
   * says where to set the bin's size. */
  bin?: BinForLoad;
}) {
  const { data: lib } = useIngredients(farmId);
  // Without the page's word on the bin's size, the form reads it itself (and then knows no farm interval).
  const { data: read } = useBin(bin ? null : binId);
  const size = read?.bin;
  const forLoad: BinForLoad | undefined =
    bin ?? (size ? { areaM2: floorAreaM2(size.lengthCm, size.widthCm), intervalDays: size.feedingIntervalDays ?? null } : undefined);
  const refresh = useBinRefresh(binId);
  const [rows, setRows] = useState<Row[]>([]);
  const [zoneId, setZoneId] = useState<string>(defaultZoneId ?? zones.find((z) => z.kind === "fresh")?.id ?? "");
  const [notes, setNotes] = useState("");
  const [query, setQuery] = useState("");
  const [beddingId, setBeddingId] = useState<string | null>(null);
  const [errors, setErrors] = useState<Record<string, string>>({});
  const [status, setStatus] = useState<{ ok: boolean; text: string } | null>(null);
  const [busy, setBusy] = useState(false);
  const focusNext = useRef<string | null>(null);
  const massUnit = UNIT_LABELS[system].mass;

  useEffect(() => {
    if (!focusNext.current) return;
    document.getElementById(focusNext.current)?.focus();
    focusNext.current = null;
  });

  const library = useMemo(() => (lib?.ingredients ?? []).filter((i) => i.kind !== "water" && isOffered(i)), [lib]);
  const matches = useMemo(() => {
    const q = query.trim().toLowerCase();
    return q ? library.filter((i) => i.name.toLowerCase().includes(q)) : library;
  }, [library, query]);
  const beddings = useMemo(() => library.filter((i) => i.kind === "bedding" && complete(i)), [library]);
  const inMix = beddings.find((b) => rows.some((r) => r.ingredientId === b.id));
  const bedding = beddings.find((b) => b.id === beddingId) ?? inMix ?? beddings.find((b) => b.key === "corrugated-cardboard") ?? beddings[0] ?? null;

  function addFromLibrary(i: IngredientRow) {
    const key = nextKey++;
    setRows((rs) => [
      ...rs,
      {
        key,
        ingredientId: i.id,
        name: i.name,
        source: i.source,
        sourceStatus: i.sourceStatus,
        mass: "",
        moisture: text(i.moisturePct),
        nitrogen: text(i.nitrogenPct),
        cn: text(cnOf(i)),
      },
    ]);
    focusNext.current = `item-${key}-massKg`;
    setQuery("");
    setStatus(null);
  }
  function addByHand() {
    const key = nextKey++;
    setRows((rs) => [...rs, { key, ingredientId: null, name: "", source: null, sourceStatus: null, mass: "", moisture: "", nitrogen: "", cn: "" }]);
    focusNext.current = `item-${key}-name`;
    setStatus(null);
  }
  const update = (key: number, patch: Partial<Row>) => setRows((rs) => rs.map((r) => (r.key === key ? { ...r, ...patch } : r)));
  const remove = (key: number) => setRows((rs) => rs.filter((r) => r.key !== key));

  const items: MixItem[] = rows.map((r) => ({
    name: r.name || "unnamed item",
    massKg: massToKg(num(r.mass), system),
    moisturePct: num(r.moisture),
    nitrogenPct: opt(r.nitrogen),
    cn: opt(r.cn),
  }));
  const known = rows.length ? checkMixAsFarAsKnown(items) : null;
  const check = known?.check ?? null;
  const counted = known ? known.counted.map((i) => items[i]!) : [];
  const waitingOf = (i: number) => known?.waiting.find((w) => w.index === i);
  const rowName = (i: number) => rows[i]?.name || `Item ${i + 1}`;

  // The load counts every mass typed, whether or not the item's other values are known yet.
  const kg = items.reduce((sum, it) => sum + (Number.isFinite(it.massKg) && it.massKg > 0 ? it.massKg : 0), 0);
  const load = kg > 0 ? loadForBin(kg, forLoad ?? { areaM2: null, intervalDays: null }, { zoneCount: zones.length, toOneZone: !!zoneId }) : null;
  const loadWords = load ? feedingLoadWords(load, system, zoneWords(zones.find((z) => z.id === zoneId))) : null;
  const sizeHref = `/farms/${farmId}/bins/${binId}#bin-size`;

  const hints: string[] = [];
  if (check) {
    const m = check;
    const moistureFix =
      m.issues.includes("too wet") && bedding
        ? { with: amendmentOf(bedding), name: bedding.name }
        : m.issues.includes("too dry")
          ? { with: WATER, name: "water" }
          : null;
    if (moistureFix) {
      const q = amendmentForMoisture(counted, moistureFix.with, MOISTURE_AIM);
      if (q.ok) hints.push(`Add ${formatMass(q.value, system, { digits: 2 })} of ${moistureFix.name} to reach ${MOISTURE_AIM} % moisture.`);
    }
    if (m.issues.includes("too rich in nitrogen") && bedding) {
      const q = beddingForCn(counted, amendmentOf(bedding), CN_AIM);
      if (q.ok) hints.push(`Add ${formatMass(q.value, system, { digits: 2 })} of ${bedding.name} to reach C:N ${CN_AIM}.`);
    }
    if (m.issues.includes("too rich in carbon"))
      hints.push(`More food or less bedding brings C:N under ${WORM_BED_TARGET.cn.high}; the bed will work slowly as it is.`);
  }

  async function submit(e: React.FormEvent) {
    e.preventDefault();
    setBusy(true);
    setErrors({});
    setStatus(null);
    const body = {
      zoneId: zoneId || null,
      notes: notes.trim() || null,
      items: rows.map((r, i) => ({
        ingredientId: r.ingredientId,
        name: r.name,
        massKg: orNull(items[i]!.massKg),
        moisturePct: orNull(items[i]!.moisturePct),
        nitrogenPct: orNull(items[i]!.nitrogenPct),
        cn: orNull(items[i]!.cn),
      })),
    };
    const where = zoneWords(zones.find((z) => z.id === zoneId));
    try {
      const what = `Feeding · ${check ? formatMass(check.totalMassKg, system, { digits: 2 }) : `${rows.length} items`} · ${where}`;
      const out = await sendOrKeep<LoggedFeeding>({ url: feedingsKey(binId)!, body, binId, what });
      setStatus({
        ok: true,
        text: out.kept ? SAVED_ON_PHONE : `Logged ${formatMass(out.value.mix.totalMassKg, system, { digits: 2 })} for ${where}: ${out.value.mix.verdict}.`,
      });
      setRows([]);
      setNotes("");
      await refresh();
    } catch (err) {
      const { field = "form", message } = failureOf(err);
      setErrors({ [field]: message });
      const at = /^items\.(\d+)\.(\w+)$/.exec(field);
      const row = at ? rows[Number(at[1])] : undefined;
      setStatus({ ok: false, text: `Not logged. ${row ? `${row.name || `Item ${Number(at![1]) + 1}`}: ` : ""}${message}` });
      focusNext.current = row ? `item-${row.key}-${at![2]}` : field === "zoneId" ? "feeding-zone" : null;
    } finally {
      setBusy(false);
    }
  }

  const err = (i: number, f: Field) => errors[`items.${i}.${f}`];
  const input =
    "tabular h-12 w-full scroll-mb-40 rounded-xl border border-soil-300 bg-paper px-3 text-lg aria-[invalid=true]:border-2 aria-[invalid=true]:border-clay-700";

  // A plain render helper, not a component: a component declared here would remount on every keystroke.
  function numberField(row: Row, i: number, f: Exclude<Field, "name">, label: string) {
    const id = `item-${row.key}-${f}`;
    const value = f === "massKg" ? row.mass : f === "moisturePct" ? row.moisture : f === "nitrogenPct" ? row.nitrogen : row.cn;
    const patch = (v: string): Partial<Row> =>
      f === "massKg" ? { mass: v } : f === "moisturePct" ? { moisture: v } : f === "nitrogenPct" ? { nitrogen: v } : { cn: v };
    const e = err(i, f);
    return (
      <div key={f}>
        <label htmlFor={id} className="block text-sm font-bold">
          {label}
        </label>
        <input
          id={id}
          name={`items.${i}.${f}`}
          inputMode="decimal"
          autoComplete="off"
          value={value}
          onChange={(ev) => {
            update(row.key, patch(ev.target.value));
            if (e) setErrors(({ [`items.${i}.${f}`]: _, ...rest }) => rest);
          }}
          aria-invalid={!!e}
          aria-describedby={e ? `${id}-error` : undefined}
          className={input}
        />
        {e && (
          <p id={`${id}-error`} className="mt-1 text-sm font-bold text-clay-700">
            {e}
          </p>
        )}
      </div>
    );
  }

  return (
    <form id="log" onSubmit={submit} noValidate className="space-y-4 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      <h2 className="text-xl font-bold">Log a feeding</h2>

      <div>
        <label htmlFor="feeding-zone" className="block font-bold">
          Where
        </label>
        <select
          id="feeding-zone"
          value={zoneId}
          onChange={(e) => setZoneId(e.target.value)}
          aria-invalid={!!errors.zoneId}
          className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg"
        >
          {zones.map((z) => (
            <option key={z.id} value={z.id}>
              {zoneWords(z)}
            </option>
          ))}
          <option value="">Whole bin</option>
        </select>
        {errors.zoneId && <p className="mt-1 text-sm font-bold text-clay-700">{errors.zoneId}</p>}
      </div>

      <fieldset className="space-y-2">
        <legend className="font-bold">Add from the ingredient library</legend>
        <input
          type="search"
          aria-label="Find an ingredient"
          placeholder="Find: scraps, cardboard, straw…"
          value={query}
          onChange={(e) => setQuery(e.target.value)}
          className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3 text-lg"
        />
        <ul aria-label="Library ingredients" className="flex max-h-56 flex-wrap gap-2 overflow-y-auto py-1">
          {matches.map((i) => (
            <li key={i.id}>
              <button type="button" onClick={() => addFromLibrary(i)} className="min-h-11 rounded-full bg-soil-100 px-3 text-left ring-1 ring-soil-300">
                <span aria-hidden="true">+ </span>
                {i.name}
                <span className="sr-only"> ({i.kind})</span>
              </button>
            </li>
          ))}
          {lib && matches.length === 0 && <li className="text-sm text-soil-700">Nothing in the library by that name; add it by hand.</li>}
        </ul>
        <button type="button" onClick={addByHand} className="min-h-12 w-full rounded-xl px-4 font-bold ring-1 ring-soil-500">
          Add an item by hand
        </button>
        {NOT_OFFERED.length > 0 && (
          <p className="text-sm text-soil-700">
            Not in the library: {NOT_OFFERED.join(", ")}. No published moisture, carbon and nitrogen were found for them; add one by hand with your
            supplier&apos;s analysis.
          </p>
        )}
      </fieldset>

      {rows.length > 0 && (
        <ol aria-label="Items in this feeding" className="space-y-3">
          {rows.map((r, i) => (
            <li key={r.key} className="rounded-xl bg-paper p-3 ring-1 ring-soil-300">
              <div className="flex items-start justify-between gap-2">
                {r.ingredientId ? (
                  <h3 className="pt-2 text-lg font-bold">{r.name}</h3>
                ) : (
                  <div className="grow">
                    <label htmlFor={`item-${r.key}-name`} className="block text-sm font-bold">
                      Name
                    </label>
                    <input
                      id={`item-${r.key}-name`}
                      value={r.name}
                      onChange={(e) => update(r.key, { name: e.target.value })}
                      aria-invalid={!!err(i, "name")}
                      className={input}
                    />
                    {err(i, "name") && <p className="mt-1 text-sm font-bold text-clay-700">{err(i, "name")}</p>}
                  </div>
                )}
                <button
                  type="button"
                  onClick={() => remove(r.key)}
                  aria-label={`Remove ${r.name || `item ${i + 1}`}`}
                  className="min-h-11 min-w-11 rounded-lg text-2xl leading-none ring-1 ring-soil-300"
                >
                  ×
                </button>
              </div>
              {r.source && (
                <p className="mt-1 text-xs text-soil-700">{ingredientSourceWords(r.source, r.sourceStatus)} Change the values for your own batch.</p>
              )}
              <div className="mt-2 grid grid-cols-2 gap-3">
                {numberField(r, i, "massKg", `Mass (${massUnit})`)}
                {numberField(r, i, "moisturePct", "Moisture (%)")}
                {numberField(r, i, "nitrogenPct", "Nitrogen (% dry)")}
                {numberField(r, i, "cn", "C:N")}
              </div>
              {waitingOf(i) && (
                <p className="mt-2 text-sm font-bold" id={`item-${r.key}-waiting`}>
                  Not counted in the mix check yet: {waitingOf(i)!.message}
                </p>
              )}
            </li>
          ))}
        </ol>
      )}
      {errors.items && <p className="text-sm font-bold text-clay-700">{errors.items}</p>}

      {/* Pinned to the bottom of the screen while items are typed above it, so the thumb never loses the numbers. */}
      <section
        aria-labelledby="mix-h"
        className={`rounded-xl bg-soil-100 p-3 ring-1 ring-soil-300 ${rows.length ? "sticky bottom-2 z-10 shadow-[0_-6px_16px_rgba(31,22,17,0.15)]" : ""}`}
      >
        <div className="flex flex-wrap items-center justify-between gap-2">
          <h3 id="mix-h" className="font-bold">
            Mix check
          </h3>
          {check && (
            <div className="flex flex-wrap items-center gap-1" id="mix-verdict">
              {check.issues.length === 0 ? <MixVerdictMark verdict="balanced" /> : check.issues.map((w) => <MixVerdictMark key={w} verdict={w} />)}
            </div>
          )}
        </div>
        {known && known.waiting.length > 0 && (
          <ul id="mix-waiting" aria-label="Not counted yet" className="text-sm">
            {known.waiting.map((w) => (
              <li key={w.index}>
                Not counted yet: {rowName(w.index)}: {w.message}
              </li>
            ))}
          </ul>
        )}
        {!check ? (
          <p className="text-sm text-soil-700">
            {rows.length ? "Give the values asked for above to see the mix's moisture and C:N." : "Add items to see the mix's moisture and C:N."}
          </p>
        ) : (
          <dl className="mt-1 grid grid-cols-3 gap-2">
            <div>
              <dt className="text-xs tracking-wide text-soil-700 uppercase">Total</dt>
              <dd id="mix-total" className="tabular text-xl font-bold">
                {formatMass(check.totalMassKg, system, { digits: 2 })}
              </dd>
            </div>
            <div>
              <dt className="text-xs tracking-wide text-soil-700 uppercase">Moisture</dt>
              <dd className="tabular text-xl font-bold">
                <span id="mix-moisture">{formatNumber(check.moisturePct, 1)}</span> %
              </dd>
            </div>
            <div>
              <dt className="text-xs tracking-wide text-soil-700 uppercase">C:N</dt>
              <dd id="mix-cn" className="tabular text-xl font-bold">
                {check.cn == null ? "—" : formatNumber(check.cn, 1)}
              </dd>
            </div>
          </dl>
        )}
        {loadWords ? (
          <div
            id="feeding-load"
            role="group"
            aria-label="Load for this bin"
            className={`mt-2 rounded-lg p-2 text-sm ${loadWords.heavy ? "bg-clay-100 ring-1 ring-clay-700" : "bg-paper"}`}
          >
            <p className="flex items-start gap-1">
              {loadWords.heavy && <Mark name="heat" />}
              <span>
                <span className="font-bold">Load: </span>
                {loadWords.lines.join(" ")}
              </span>
            </p>
            {loadWords.heavy && (
              <p className="mt-1">Watch the zone&apos;s temperature for a day or two; a heating bed can give off ammonia, so air a closed room.</p>
            )}
            {(!forLoad || forLoad.areaM2 === null) && (
              <p className="mt-1">
                <Link href={sizeHref} className="underline underline-offset-4">
                  Add the bin&apos;s size to weigh feedings against it
                </Link>
              </p>
            )}
          </div>
        ) : (
          (!forLoad || forLoad.areaM2 === null) && (
            <p className="mt-2 text-sm">
              <Link href={sizeHref} className="underline underline-offset-4">
                Add the bin&apos;s size to weigh feedings against it
              </Link>
            </p>
          )
        )}
      </section>
      {check && (
        <div aria-label="What would balance the mix" role="group" className="rounded-xl p-3 ring-1 ring-soil-300">
          <p className="text-sm text-soil-700">
            Worm bed aim: moisture {WORM_BED_TARGET.moisturePct.low}–{WORM_BED_TARGET.moisturePct.high} %, C:N {WORM_BED_TARGET.cn.low}–
            {WORM_BED_TARGET.cn.high}.{hints.length === 0 ? " This mix sits inside both." : ""}
          </p>
          {hints.length > 0 && (
            <ul id="mix-hints" className="mt-2 list-disc space-y-1 pl-5">
              {hints.map((h) => (
                <li key={h} className="tabular">
                  {h}
                </li>
              ))}
            </ul>
          )}
          {hints.length > 0 && beddings.length > 1 && bedding && (
            <div className="mt-2">
              <label htmlFor="hint-bedding" className="block text-sm font-bold">
                Bedding for these hints
              </label>
              <select
                id="hint-bedding"
                value={bedding.id}
                onChange={(e) => setBeddingId(e.target.value)}
                className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3"
              >
                {beddings.map((b) => (
                  <option key={b.id} value={b.id}>
                    {b.name}
                  </option>
                ))}
              </select>
            </div>
          )}
        </div>
      )}

      <div>
        <label htmlFor="feeding-notes" className="block font-bold">
          Notes (optional)
        </label>
        <textarea
          id="feeding-notes"
          value={notes}
          onChange={(e) => setNotes(e.target.value)}
          rows={2}
          className="w-full rounded-xl border border-soil-300 bg-paper p-3"
        />
      </div>

      <aside aria-label="Caution" className="rounded-xl bg-straw-100 p-3 text-sm ring-1 ring-straw-600">
        <p className="font-bold">Careful</p>
        <ul className="list-disc pl-5">
          <li>A big load of fresh food can heat up by itself and give off ammonia: feed a little at a time and watch the zone&apos;s temperature.</li>
          <li>{WASH_HANDS}</li>
          <li>{CASTINGS_NOT_FOOD}</li>
          <li>{LOCAL_CODES}</li>
        </ul>
      </aside>

      <button disabled={busy} className="min-h-14 w-full rounded-xl bg-leaf-700 px-4 text-lg font-bold text-white disabled:opacity-60">
        {busy ? "Logging…" : "Log this feeding"}
      </button>
      <LogStatus status={status} />
    </form>
  );
}
