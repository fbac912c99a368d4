"use client";

import { useState } from "react";
import Link from "next/link";
import { failureOf, send } from "@/lib/client/fetcher";
import { useProbes } from "@/lib/client/hooks/use-probes";
import { useSend } from "@/lib/client/use-send";
import { probesKey } from "@/lib/client/swr-keys";
import type { ProbeRow, RegisteredProbe, RotatedToken } from "@/lib/client/wire";
import { presenceWords } from "@/lib/domain/probe-presence";
import { Mark, type MarkName } from "@/components/ui/marks";
import type { PublicAddresses } from "@/lib/domain/probe-snippets";
import type { ProbePresenceState } from "@/lib/domain/vocabulary";
import { ConnectProbe } from "./connect-probe";

type ZoneOption = { id: string; label: string };

// Presence by word and shape, never by colour alone, with the marks of the registry: a wriggle
// reports, a wriggle run flat has gone quiet (the silent-probe alert's word), dashes have not sent yet.
const PRESENCE_LOOK: Record<ProbePresenceState | "archived", { cls: string; mark: MarkName }> = {
  reporting: { cls: "bg-leaf-100 text-leaf-700 ring-leaf-500", mark: "reporting" },
  silent: { cls: "bg-straw-100 text-straw-800 ring-straw-600 font-bold ring-2", mark: "silent" },
  "no-reading-yet": { cls: "bg-soil-100 text-soil-700 ring-soil-300", mark: "waiting" },
  archived: { cls: "bg-soil-100 text-soil-700 ring-soil-300", mark: "archived" },
};

function Presence({ probe, headline }: { probe: ProbeRow; headline: string }) {
  const look = PRESENCE_LOOK[probe.archivedAt ? "archived" : probe.presence.state];
  return (
    <span
      data-presence={probe.archivedAt ? "archived" : probe.presence.state}
      className={`inline-flex shrink-0 items-center gap-1 rounded-full px-2 py-0.5 text-sm ring-1 ${look.cls}`}
    >
      <Mark name={look.mark} size={14} />
      {probe.archivedAt ? "archived" : headline}
    </span>
  );
}

type Shown = { probeId: number; code: string; token: string; reportIntervalS: number; from: "register" | "rotate" };

export function ProbeList({
  farmId,
  zones,
  canManage,
  addresses,
}: {
  farmId: string;
  zones: ZoneOption[];
  canManage: boolean;
  addresses: PublicAddresses | null;
}) {
  const { data, error, mutate } = useProbes(farmId);
  const [shown, setShown] = useState<Shown | null>(null);
  const { busy, errors, setErrors, run } = useSend();

  async function register(e: React.FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    const sent = await run(() =>
      send<RegisteredProbe>("POST", probesKey(farmId)!, {
        code: f.get("code"),
        zoneId: f.get("zoneId") || null,
        label: f.get("label") || null,
        metrics: f.getAll("metrics"),
      }),
    );
    if (!sent.ok) return;
    const body = sent.value;
    (e.target as HTMLFormElement).reset();
    // The list first, so the box below it does not move once shown.
    await mutate();
    setShown({ probeId: body.probe.id, code: body.probe.code, token: body.token, reportIntervalS: body.probe.reportIntervalS, from: "register" });
  }

  async function newToken(p: ProbeRow) {
    if (!confirm(`Replace the token of ${p.code}? The probe stops reporting until it has the new one.`)) return;
    try {
      const { token } = await send<RotatedToken>("POST", `/api/probes/${p.id}/token`);
      setShown({ probeId: p.id, code: p.code, token, reportIntervalS: p.reportIntervalS, from: "rotate" });
    } catch (err) {
      setErrors({ form: failureOf(err).message });
    }
  }

  async function archive(p: ProbeRow, archived: boolean) {
    try {
      await send("PATCH", `/api/probes/${p.id}`, { archived });
    } catch (err) {
      setErrors({ form: failureOf(err).message });
    }
    await mutate();
  }

  // The token and how to connect, where the owner tapped: at the register form, or under the probe given a new token.
  const connect = (from: Shown["from"], probeId?: number) =>
    shown && addresses && shown.from === from && (probeId === undefined || shown.probeId === probeId) ? (
      <ConnectProbe
        code={shown.code}
        token={shown.token}
        reportIntervalS={shown.reportIntervalS}
        addresses={addresses}
        probeHref={`/farms/${farmId}/probes/${shown.probeId}`}
        onDone={() => setShown(null)}
      />
    ) : null;

  if (!data) return <p className="p-4">{error ? error.message : "Loading…"}</p>;
  return (
    <div className="space-y-4 p-3">
      {data.probes.length === 0 && (
        <p className="rounded-2xl bg-white p-4 ring-1 ring-soil-300">No probes yet.{canManage ? " Register the first one below." : ""}</p>
      )}
      <ul className="space-y-2">
        {data.probes.map((p) => {
          const presence = presenceWords(p.presence, data.at, data.timeZone);
          return (
            <li key={p.id} className={`rounded-2xl bg-white p-4 ring-1 ring-soil-300 ${p.archivedAt ? "opacity-60" : ""}`}>
              <div className="flex items-baseline justify-between gap-2">
                <h2 className="font-bold">{p.label ?? p.code}</h2>
                <Presence probe={p} headline={presence.headline} />
              </div>
              <p className="text-sm text-soil-700">
                {p.code} · {p.binName ? `${p.binName}, ${p.zoneKind} zone` : "not placed in a zone"}
              </p>
              {!p.archivedAt && <p className="tabular text-sm">{presence.detail}</p>}
              <p className="tabular text-sm text-soil-700">
                Reports every {p.reportIntervalS} s{p.connected ? " · connection open now" : ""}
                {p.batteryV != null ? ` · battery ${p.batteryV.toFixed(2)} V` : ""}
                {p.signalDbm != null ? ` · signal ${p.signalDbm} dBm` : ""}
                {p.firmware ? ` · ${p.firmware}` : ""}
              </p>
              <Link href={`/farms/${farmId}/probes/${p.id}`} className="inline-flex min-h-11 items-center text-soil-700 underline underline-offset-4">
                Health, refused messages and calibration
              </Link>
              {canManage && (
                <div className="mt-2 flex flex-wrap gap-2">
                  {!p.archivedAt && (
                    <button onClick={() => newToken(p)} className="min-h-11 rounded-lg px-3 ring-1 ring-soil-300">
                      New token
                    </button>
                  )}
                  <button onClick={() => archive(p, !p.archivedAt)} className="min-h-11 rounded-lg px-3 ring-1 ring-soil-300">
                    {p.archivedAt ? "Bring back" : "Archive"}
                  </button>
                </div>
              )}
              {connect("rotate", p.id)}
            </li>
          );
        })}
      </ul>
      {connect("register")}
      {canManage && (
        <form onSubmit={register} className="space-y-3 rounded-2xl bg-white p-4 ring-1 ring-soil-300">
          <h2 className="text-lg font-bold">Register a probe</h2>
          <label className="block">
            <span className="block font-bold">Probe code</span>
            <input
              name="code"
              required
              placeholder="shed-03"
              aria-invalid={!!errors.code}
              className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3"
            />
            {errors.code && <span className="text-sm text-clay-700">{errors.code}</span>}
          </label>
          <label className="block">
            <span className="block font-bold">Zone</span>
            <select name="zoneId" aria-invalid={!!errors.zoneId} className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3">
              <option value="">Not placed yet</option>
              {zones.map((z) => (
                <option key={z.id} value={z.id}>
                  {z.label}
                </option>
              ))}
            </select>
            {errors.zoneId && <span className="text-sm text-clay-700">{errors.zoneId}</span>}
          </label>
          <label className="block">
            <span className="block font-bold">Label (optional)</span>
            <input name="label" className="h-12 w-full rounded-xl border border-soil-300 bg-paper px-3" />
          </label>
          <fieldset>
            <legend className="font-bold">Measures</legend>
            {[
              ["temperature", "Temperature"],
              ["moisture", "Moisture (calibrated)"],
              ["moisture-raw", "Moisture (raw count)"],
              ["ammonia", "Ammonia"],
            ].map(([v, l]) => (
              <label key={v} className="flex min-h-11 items-center gap-2">
                <input type="checkbox" name="metrics" value={v} defaultChecked={v === "temperature" || v === "moisture"} className="h-5 w-5" /> {l}
              </label>
            ))}
            {errors.metrics && <span className="text-sm text-clay-700">{errors.metrics}</span>}
          </fieldset>
          <p className="text-sm text-soil-700">
            Power probes from a low-voltage supply with ground-fault protection, as your local electrical code requires; keep mains connections out of damp
            bedding. Follow local codes and licensed practice.
          </p>
          <button disabled={busy} className="min-h-12 rounded-xl bg-leaf-700 px-4 font-bold text-white disabled:opacity-60">
            {busy ? "Registering…" : "Register"}
          </button>
          <p aria-live="polite" className="text-sm text-clay-700">
            {errors.form}
          </p>
        </form>
      )}
    </div>
  );
}
