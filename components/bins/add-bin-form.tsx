"use client";

import { useState } from "react";
import { send } from "@/lib/client/fetcher";
import { useTodayRefresh } from "@/lib/client/revalidate";
import { useSend } from "@/lib/client/use-send";
import type { AddedBin } from "@/lib/client/wire";
import { BIN_STYLES } from "@/lib/domain/vocabulary";

const SPECIES = [
  ["eisenia-fetida", "Eisenia fetida / andrei (red wiggler)"],
  ["eisenia-hortensis", "Eisenia hortensis"],
  ["eudrilus-eugeniae", "Eudrilus eugeniae"],
  ["perionyx-excavatus", "Perionyx excavatus"],
] as const;

// Owners add a bin from Today; its zones are made from the count, feeding side first.
export function AddBinForm({ farmId }: { farmId: string }) {
  const refreshToday = useTodayRefresh(farmId);
  const [open, setOpen] = useState(false);
  const { busy, errors, run } = useSend();
  const [done, setDone] = useState<string | null>(null);

  async function submit(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const sent = await run(() =>
      send<AddedBin>("POST", `/api/farms/${farmId}/bins`, {
        name: f.get("name"),
        style: f.get("style"),
        species: f.get("species"),
        zoneCount: Number(f.get("zoneCount")),
      }),
    );
    if (!sent.ok) return;
    const body = sent.value;
    setDone(`Added ${body.bin.name} with ${body.bin.zones.length} zone${body.bin.zones.length === 1 ? "" : "s"}.`);
    setOpen(false);
    await refreshToday();
  }

  const input = "h-12 w-full rounded-xl border border-soil-300 bg-paper px-3";
  return (
    <section className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">
      {!open ? (
        <button
          onClick={() => {
            setOpen(true);
            setDone(null);
          }}
          className="min-h-12 rounded-xl bg-soil-800 px-4 font-bold text-white"
        >
          Add a bin
        </button>
      ) : (
        <form onSubmit={submit} className="space-y-3">
          <h2 className="text-lg font-bold">Add a bin</h2>
          <label className="block">
            <span className="block font-bold">Name</span>
            <input name="name" required maxLength={80} aria-invalid={!!errors.name} className={input} />
            {errors.name && <span className="text-sm text-clay-700">{errors.name}</span>}
          </label>
          <label className="block">
            <span className="block font-bold">Style</span>
            <select name="style" className={input} defaultValue="tote">
              {BIN_STYLES.map((s) => (
                <option key={s}>{s}</option>
              ))}
            </select>
          </label>
          <label className="block">
            <span className="block font-bold">Species</span>
            <select name="species" className={input}>
              {SPECIES.map(([v, l]) => (
                <option key={v} value={v}>
                  {l}
                </option>
              ))}
            </select>
          </label>
          <label className="block">
            <span className="block font-bold">Zones (feeding side to harvest side)</span>
            <select name="zoneCount" className={input} defaultValue="3">
              {[1, 2, 3, 4, 5, 6].map((n) => (
                <option key={n}>{n}</option>
              ))}
            </select>
            {errors.zoneCount && <span className="text-sm text-clay-700">{errors.zoneCount}</span>}
          </label>
          <div className="flex gap-2">
            <button disabled={busy} className="min-h-12 rounded-xl bg-leaf-700 px-4 font-bold text-white disabled:opacity-60">
              {busy ? "Adding…" : "Add"}
            </button>
            <button type="button" onClick={() => setOpen(false)} className="min-h-12 rounded-xl px-4 ring-1 ring-soil-300">
              Cancel
            </button>
          </div>
          {errors.form && <p className="text-sm text-clay-700">{errors.form}</p>}
        </form>
      )}
      <p aria-live="polite" className="mt-2 text-sm text-leaf-700">
        {done}
      </p>
    </section>
  );
}
