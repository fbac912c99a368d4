// Alert rules: pure functions from a zone's recent readings and context to alert transitions.
//
// Design
// - Input (ZoneRuleInput): now; the zone (id, kind, bin and zone names); the species profile; the
//   owner's overrides merged farm → bin; the bin's size (bed); each probe's readings over
//   lookback().readingsMs (about three days by default: the daily rhythm, a slow probe's window,
//   the longest hold, an hour spare); the bin's feedings over the longest post-feed watch; the
//   zone's probes (report interval, last seen, metrics, recent refusals); the open alerts.
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
// - Heat: heads-up above the comfortable band, act now at warm stress, each held 10 min. A feeding
//   of 4 kg or more per m² of bed (its zone's share when fed to one zone; 2 kg when the bin has no
//   size) arms a post-feed watch of 48 h, longer for heavier feedings up to 96 h; while it lasts, a
//   least-squares rise over the last 60 min that beats the zone's usual rate at that hour (median
//   of the same hour on the previous 3 days) by 1 °C/h raises a heads-up even inside the band.
// - Every report interval from 1 min to 1 h: a rate window stretches to three reports, a raise's
//   hold is rounded down to whole report intervals (an hourly probe raises on its first reading past
//   a line), and a settle needs three readings in a row as well as its minutes. A probe's stuck
//   step is its own resolution (a whole-percent probe moves in 1 % steps).
// - Drying: below the band, or a 24 h trend that crosses the band's lower edge within 12 h.
// - Ammonia: measured (ppm) where any probe of the zone reads NH3; elsewhere estimated from the
//   last feeding's mix check (C:N below the mix check's own nitrogen-rich line, a wet mix for its
//   first 24 h while the zone is not cooling) and warming, always a heads-up; it settles once the
//   causes are gone (its warming deadband sits below the trigger).
// - Silent probe: nothing for three report intervals (at least 10 min); it settles only after an
//   hour of on-time reports, so a flaky probe raises once per spell. Probe fault: error codes or
//   out-of-range values for 5 min (stored, or refused by the ingest), or no change for 6 h.
// - An open alert keeps the words it was raised (or escalated) with; an update carries the latest
//   value and time in details (latestValue, latestAt), and new words only when the farm's units change.
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
