// Alert rules: pure functions from a zone's recent readings and context to alert transitions.
//
// Design
// - Input (ZoneRuleInput): now; the zone (id, kind, bin and zone names); the species profile; the
//   owner's overrides merged farm → bin; each probe's readings over lookback().readingsMs (about a
//   day and a quarter by default: the day's drying trend, the longest hold, an hour spare); the bin's feedings over the 72 h watch;
//   the zone's probes (report interval, last seen, metrics, recent refusals); the open alerts.
// - Output: transitions raise | escalate (heads_up → act_now) | settle | update, each with subject,
//   kind, level, value, a message in plain words naming bin, zone, value and rate, and details.
//   Subjects are `zone:<zoneId>:<kind>` (heat, chill, drying, soggy, ammonia) and
//   `probe:<probeId>:<kind>` (silent_probe, probe_fault): one open alert per subject in the database.
// - State lives in the open alerts, not here. Without an open alert a kind raises once one of its
//   triggers has held over consecutive readings for its duration; with one, it escalates when an
//   act-now trigger has held, and settles only once the value has been past the heads-up line by
//   the deadband for the settle duration. A level never drops while open. So a series wandering
//   around a line raises at most once and does not settle until it truly leaves (no flapping), and
//   the same input always gives the same output, whichever ingest node or restart runs it.
// - A gap in a probe's readings as long as the silent-probe line breaks a run; a probe whose last
//   reading is older than that line takes no part (its silence is its own alert). With several
//   probes in a zone the worst one speaks, and the zone settles only when every fresh one has.
// - Defaults: RULE_PARAMETERS (params.ts) lists every number with its source; most come from the
//   species profile, the rest are marked "common practice" or "from memory". Owners may change any
//   number per farm or bin, or turn a kind off (an open alert of a kind turned off settles).
// - Heat: heads-up above the comfortable band, act now at warm stress, each held 10 min; after a
//   feeding (in this zone, or in the whole bin) the zone is watched 72 h, and a least-squares rise
//   over the last 60 min faster than 1 °C/h raises a heads-up even inside the band. Act now comes
//   at warm stress (30 °C for E. fetida, where Loehr et al. 1985 found growth reduced), not at the
//   band's edge: the heads-up already says the bed has left its band.
// - Drying: below the band, or a 24 h trend that crosses the band's lower edge within 12 h.
// - Ammonia: measured (ppm) where any probe of the zone reads NH3; elsewhere estimated from the
//   last feeding's mix check (C:N below 25, wet mix) and warming, always a heads-up.
// - Silent probe: nothing for three report intervals (at least 10 min). Probe fault: error codes
//   or out-of-range values for 5 min (stored, or refused by the ingest), or no change for 6 h.
// - replay() runs a history through the rules minute by minute, as the runner would have.
export * from "./params";
export type * from "./types";
export {
  PROBE_KINDS,
  ZONE_ALERT_KINDS,
  applyTransitions,
  evaluateZone,
  isProbeKind,
  probeSubject,
  zoneSubject,
  type ProbeAlertKind,
  type ZoneAlertKind,
} from "./evaluate";
export { silentLineMs } from "./context";
export { refusalFault, refusalFaults, valueFault, type RefusalFault } from "./probe-health";
export { replay, type ReplayInput, type ReplayStep } from "./replay";
