"use client";

import { useEffect, useMemo, useState } from "react";
import { PreviewChart, type ChartSpan } from "@/components/charts/preview-chart";
import { Mark, type MarkName } from "@/components/ui/marks";
import { failureOf, send } from "@/lib/client/fetcher";
import type { RulePreview as Preview } from "@/lib/client/wire";
import { cautionFor, LEVEL_WORDS } from "@/lib/domain/alert-words";
import type { RuleKind } from "@/lib/domain/rules/params";
import { temperatureForDisplay, UNIT_LABELS, type UnitSystem } from "@/lib/domain/units";
import type { KindState } from "./rule-card";

/** How long typing must pause before the preview asks again. */
const DEBOUNCE_MS = 500;

const KIND_MARK: Record<RuleKind, MarkName> = {
  heat: "heat",
  chill: "cold",
  drying: "dry",
  soggy: "wet",
  ammonia: "ammonia",
  silent_probe: "silent",
  probe_fault: "error",
};

type Counts = { heads_up: number; act_now: number };
const countWords = (c: Counts) => `${c.heads_up} ${LEVEL_WORDS.heads_up.toLowerCase()}, ${c.act_now} ${LEVEL_WORDS.act_now.toLowerCase()}`;

type State = { status: "loading" } | { status: "error"; message: string } | { status: "done"; preview: Preview };

// What the card's unsaved values would have raised over the bin's last 30 days, asked of the server
// a moment after each edit (POST /api/bins/[binId]/rules/preview, which stores nothing), beside what
// the saved rules would have raised there.
export function RulePreview({
  binId,
  kind,
  word,
  change,
  system,
  timezone,
}: {
  binId: string;
  kind: RuleKind;
  word: string;
  change: KindState;
  system: UnitSystem;
  timezone: string;
}) {
  const body = JSON.stringify({ kind, enabled: change.enabled, thresholds: change.thresholds });
  const [state, setState] = useState<State>({ status: "loading" });

  useEffect(() => {
    let stale = false;
    const timer = setTimeout(() => {
      setState({ status: "loading" });
      send<Preview>("POST", `/api/bins/${binId}/rules/preview`, JSON.parse(body))
        .then((preview) => !stale && setState({ status: "done", preview }))
        .catch((e) => !stale && setState({ status: "error", message: failureOf(e).message }));
    }, DEBOUNCE_MS);
    return () => {
      stale = true;
      clearTimeout(timer);
    };
  }, [binId, body]);

  const id = `preview-${kind}`;
  return (
    <section aria-labelledby={`${id}-h`} data-testid={id} className="space-y-2 rounded-xl bg-straw-100 p-3">
      <h3 id={`${id}-h`} className="font-bold">
        Before you save: the last 30 days with this change
      </h3>
      <div aria-live="polite" className="space-y-2">
        {state.status === "loading" && (
          <p className="text-soil-700" role="status">
            Replaying this bin&apos;s last 30 days; this can take a few seconds…
          </p>
        )}
        {state.status === "error" && (
          <p className="flex items-center gap-1 font-bold text-clay-700">
            <Mark name="error" />
            The preview could not be worked out: {state.message}
          </p>
        )}
        {state.status === "done" && <PreviewBody preview={state.preview} word={word} system={system} timezone={timezone} />}
      </div>
      <p className="text-sm text-soil-700">Nothing is saved until you press Save.</p>
    </section>
  );
}

function PreviewBody({ preview, word, system, timezone }: { preview: Preview; word: string; system: UnitSystem; timezone: string }) {
  if (!preview.hasReadings) {
    return <p>This bin has no readings in the last {preview.days} days, so there is nothing to replay the rule on.</p>;
  }
  const same = preview.now.heads_up === preview.proposed.heads_up && preview.now.act_now === preview.proposed.act_now;
  const fewer =
    preview.proposed.heads_up + preview.proposed.act_now < preview.now.heads_up + preview.now.act_now || preview.proposed.act_now < preview.now.act_now;
  const caution = cautionFor(preview.kind);
  return (
    <>
      <p data-testid="preview-counts" className="tabular text-lg leading-snug">
        <span className="font-bold">{word} alerts</span> now: {countWords(preview.now)} → with your change:{" "}
        <span className="font-bold">{countWords(preview.proposed)}</span>
      </p>
      {same && <p className="text-sm">The change would have raised the same number of alerts.</p>}
      {fewer && caution && (
        <p className="flex gap-1 text-sm font-bold">
          <Mark name="caution" className="mt-1" />
          <span>
            Fewer {word.toLowerCase()} alerts means later warning. {caution}
          </span>
        </p>
      )}
      <details className="text-sm text-soil-700">
        <summary className="min-h-11 cursor-pointer py-2 font-bold">How this is worked out</summary>
        <p>
          The saved rules and your change are replayed through the same rules code the live alerts use, over this bin&apos;s stored readings and feedings,
          checked every {preview.stepMinutes} min. The live rules check at each reading, so a start or an end here may be up to {preview.stepMinutes} min off,
          and a spell that only just lasted long enough may be missed. An alert that grew from heads-up to act now counts once, as act now.
        </p>
      </details>
      {preview.zones.map((z) => (
        <ZonePreview key={z.id} zone={z} preview={preview} word={word} system={system} timezone={timezone} />
      ))}
    </>
  );
}

const MAX_LISTED = 6;

function ZonePreview({
  zone,
  preview,
  word,
  system,
  timezone,
}: {
  zone: Preview["zones"][number];
  preview: Preview;
  word: string;
  system: UnitSystem;
  timezone: string;
}) {
  const conv = useMemo(() => (zone.metric === "temperature" ? (v: number) => temperatureForDisplay(v, system) : (v: number) => v), [zone.metric, system]);
  const unit = zone.metric === "temperature" ? UNIT_LABELS[system].temperature : zone.metric === "ammonia" ? "ppm" : "%";
  const t = useMemo(() => zone.line.t.map((x) => x / 1000), [zone.line.t]);
  const v = useMemo(() => zone.line.v.map(conv), [zone.line.v, conv]);
  const toChart = (s: Preview["zones"][number]["spans"][number]): ChartSpan => ({
    from: s.from / 1000,
    to: s.to === null ? null : s.to / 1000,
    strong: s.level === "act_now",
  });
  const spans = useMemo(() => zone.spans.map(toChart), [zone.spans]);
  const nowSpans = useMemo(() => zone.nowSpans.map(toChart), [zone.nowSpans]);
  const lines = useMemo(
    () =>
      zone.lines
        ? { headsUp: zone.lines.headsUp === null ? null : conv(zone.lines.headsUp), actNow: zone.lines.actNow === null ? null : conv(zone.lines.actNow) }
        : null,
    [zone.lines, conv],
  );
  const when = useMemo(() => whenFormat(timezone), [timezone]);
  const metricWord = zone.metric === "temperature" ? "Temperature" : zone.metric === "ammonia" ? "Ammonia" : "Moisture";

  return (
    <div className="space-y-1 border-t border-straw-300 pt-2" data-testid={`preview-zone-${zone.id}`}>
      <h4 className="font-bold">{zone.name}</h4>
      <p className="tabular text-sm">
        Now {countWords(zone.now)} → with your change {countWords(zone.proposed)}
      </p>
      {t.length > 0 ? (
        <>
          <p className="text-sm text-soil-700">
            {metricWord} ({unit}), hourly. Shaded from where each of your change&apos;s alerts begins (its mark above) to where it ends (darker: act now); the
            strip below: the saved rules&apos; alerts; dashed: the heads-up and act-now lines.
          </p>
          <PreviewChart
            t={t}
            v={v}
            from={preview.from / 1000}
            to={preview.to / 1000}
            timezone={timezone}
            spans={spans}
            nowSpans={nowSpans}
            lines={lines}
            color={zone.metric === "moisture" ? "--color-slate-500" : "--color-clay-700"}
            mark={KIND_MARK[preview.kind]}
            label={`${metricWord} of ${zone.name} over the last ${preview.days} days with ${zone.spans.length} would-be ${word.toLowerCase()} alerts shaded`}
          />
        </>
      ) : (
        <p className="text-sm">
          No {metricWord.toLowerCase()} readings here in the last {preview.days} days.
        </p>
      )}
      {zone.spans.length > 0 && (
        <ul className="space-y-0.5 text-sm" aria-label={`Would-be alerts in ${zone.name}`}>
          {zone.spans.slice(0, MAX_LISTED).map((s) => (
            <li key={`${s.subject}:${s.from}`} className="tabular flex items-center gap-1">
              <Mark name={KIND_MARK[preview.kind]} />
              <span className={s.level === "act_now" ? "font-bold" : undefined}>{LEVEL_WORDS[s.level]}</span>
              <span>
                {when(s.from)} – {s.to === null ? "still open at the end" : when(s.to)}
              </span>
            </li>
          ))}
          {zone.spans.length > MAX_LISTED && <li>and {zone.spans.length - MAX_LISTED} more</li>}
        </ul>
      )}
    </div>
  );
}

function whenFormat(timeZone: string) {
  let f: Intl.DateTimeFormat;
  try {
    f = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZone });
  } catch {
    f = new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "short", hour: "2-digit", minute: "2-digit", hourCycle: "h23", timeZone: "UTC" });
  }
  return (ms: number) => f.format(new Date(ms));
}
