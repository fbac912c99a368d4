// Whether a probe is reporting, told on the silent-probe rule's own line, so that the probe list
// and the silent-probe alert never disagree: anything heard from the probe (a reading over MQTT or
// HTTP, a presence message, a refused message) keeps it reporting; nothing for the line's length
// (rules/context.ts silentLineMs: so many missed reports, never sooner than the rule's minimum)
// makes it silent since the last time it was heard. A probe never heard from is not silent but not
// installed yet, as the rule has it. Whether it holds an MQTT connection now is not part of this.
import { localClock, zonedFormat } from "./clock";
import { overridesFromRuleRows, resolveRules, silentLineMs, type ResolvedRule, type RuleRow } from "./rules";
import { getSpecies, speciesProfiles } from "./species";
import type { ProbePresenceState } from "./vocabulary";

const MINUTE = 60_000;

export type ProbePresence = {
  state: ProbePresenceState;
  /** The time of its latest stored reading. */
  lastReadingAt: Date | null;
  /** The last time anything was heard from it: a reading, a presence message, a refused message. */
  lastHeardAt: Date | null;
  /** The same time when it is silent (the alert's "sent nothing since"), else null. */
  silentSince: Date | null;
  /** The silent-probe line for this probe, in whole minutes. */
  silentAfterMinutes: number;
};

/** The silent-probe rule that applies to a probe: the farm's, with its bin's own laid over it. */
export function silentRuleFor(rows: readonly RuleRow[], bin: { id: string; species: string } | null): ResolvedRule<"silent_probe"> {
  // The silent-probe numbers are the same for every species; a probe not placed in a bin follows the farm's rule.
  const species = (bin && getSpecies(bin.species)) ?? speciesProfiles["eisenia-fetida"];
  return resolveRules(species, overridesFromRuleRows(rows, bin?.id ?? "")).silent_probe;
}

export function probePresence(
  probe: { lastReadingAt: Date | null; lastHeardAt: Date | null; reportIntervalS: number },
  rule: Pick<ResolvedRule<"silent_probe">, "t">,
  now: Date,
): ProbePresence {
  const lineMs = silentLineMs(rule.t, probe.reportIntervalS);
  const heard = [probe.lastHeardAt, probe.lastReadingAt].filter((d): d is Date => d !== null && Number.isFinite(d.getTime()));
  const last = heard.length ? Math.max(...heard.map((d) => d.getTime())) : null;
  const silent = last !== null && now.getTime() - last >= lineMs;
  return {
    state: silent ? "silent" : probe.lastReadingAt ? "reporting" : "no-reading-yet",
    lastReadingAt: probe.lastReadingAt,
    lastHeardAt: last === null ? null : new Date(last),
    silentSince: silent ? new Date(last) : null,
    silentAfterMinutes: Math.round(lineMs / MINUTE),
  };
}

type When = string | number | Date;
const ms = (t: When) => new Date(t).getTime();

/** "just now", "4 min ago", "3 h ago", then the farm's date and time. */
export function agoWords(t: When, now: When, timeZone: string): string {
  const min = Math.floor((ms(now) - ms(t)) / MINUTE);
  if (min < 1) return "just now";
  if (min < 60) return `${min} min ago`;
  if (min < 24 * 60) return `${Math.floor(min / 60)} h ago`;
  return clockWords(t, now, timeZone);
}

/** A time on the farm's clock: "04:10" today, "3 Dec 04:10" on another day. */
export function clockWords(t: When, now: When, timeZone: string): string {
  const sameDay = localClock(new Date(t), timeZone).date === localClock(new Date(now), timeZone).date;
  const time = zonedFormat(timeZone, { hour: "2-digit", minute: "2-digit" })(t);
  return sameDay ? time : `${zonedFormat(timeZone, { day: "numeric", month: "short" })(t)} ${time}`;
}

/** A presence as the probe list says it: a short headline and what follows it. */
export function presenceWords(
  p: { state: ProbePresenceState; lastReadingAt: When | null; lastHeardAt: When | null; silentSince: When | null; silentAfterMinutes: number },
  now: When,
  timeZone: string,
): { headline: string; detail: string } {
  const lastReading = p.lastReadingAt === null ? "no reading yet" : `last reading ${agoWords(p.lastReadingAt, now, timeZone)}`;
  switch (p.state) {
    case "reporting":
      return { headline: "reporting", detail: lastReading };
    case "silent":
      return {
        headline: `silent since ${clockWords(p.silentSince ?? now, now, timeZone)}`,
        detail: `${lastReading} · silent after ${p.silentAfterMinutes} min without a report`,
      };
    case "no-reading-yet":
      return {
        headline: "no reading yet",
        detail: p.lastHeardAt === null ? "nothing heard from it yet" : `heard from ${agoWords(p.lastHeardAt, now, timeZone)}, no reading sent`,
      };
  }
}
