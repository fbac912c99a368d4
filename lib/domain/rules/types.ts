// What one evaluation of a zone's rules reads and what it answers. Times are epoch milliseconds.
import type { AlertKind, Metric, ZoneKind } from "@/lib/domain/vocabulary";
import type { SpeciesProfile } from "../species";
import type { SeriesPoint } from "../trend";
import type { UnitSystem } from "../units";
import type { AlertLevel, ResolvedRules, RuleKind, RuleOverrides } from "./params";

export type ZoneContext = { id: string; kind: ZoneKind; binName: string; zoneName?: string | null };

/** The bin's bed, for how heavy a feeding is: its floor (bins.length_cm × width_cm) and how many zones share it. */
export type BedContext = { lengthCm?: number | null; widthCm?: number | null; zoneCount?: number | null };

/** One probe's readings of one metric (stored units: °C, % wet basis, ppm, ...). */
export type ProbeSeries = {
  probeId: number;
  metric: Metric;
  points: readonly SeriesPoint[];
  /** The points are already clean (cleanSeries: time order, finite, one per instant), as replay()
   * hands them over, so an evaluation takes them as they are instead of copying them each step. */
  clean?: boolean;
};

export type FeedingContext = {
  at: number;
  /** null: fed to the whole bin, so it counts for every zone. */
  zoneId?: string | null;
  mixMoisturePct?: number | null;
  mixCn?: number | null;
  totalKg?: number | null;
};

export type ProbeContext = {
  id: number;
  code: string;
  label?: string | null;
  reportIntervalS: number;
  /** probes.last_seen_at: any message, even one whose values were refused. */
  lastSeenAt: number | null;
  metrics: readonly string[];
  /** The probe's recent rejected_messages rows (received_at, reason). */
  refusals?: readonly { at: number; reason: string }[];
};

export type AlertState = "raised" | "claimed" | "settled";

export type OpenAlert = {
  subject: string;
  kind: AlertKind;
  level: AlertLevel;
  state: AlertState;
  raisedAt: number;
  details?: Record<string, unknown>;
  value?: number | null;
  /** When given, an update is proposed only if the new message reads differently. */
  message?: string;
};

export type ZoneRuleInput = {
  now: number;
  zone: ZoneContext;
  species: SpeciesProfile;
  /** Merged farm → bin (overridesFromRuleRows). */
  overrides?: RuleOverrides;
  /** resolveRules(species, overrides) when the caller already has it (it sized the lookback). */
  rules?: ResolvedRules;
  /** The bin's size; without it a feeding is weighed against heat.heavyFeedKg alone. */
  bed?: BedContext;
  /** Over lookback().readingsMs. */
  readings: readonly ProbeSeries[];
  /** The bin's feedings over lookback().feedingsMs; other zones' are ignored. */
  recentFeedings: readonly FeedingContext[];
  probes: readonly ProbeContext[];
  /** Open alerts of this zone and its probes. */
  openAlerts: readonly OpenAlert[];
  /** Default all; the minute sweep asks for silent_probe alone. */
  kinds?: readonly RuleKind[];
  unitSystem?: UnitSystem;
  /** The farm's IANA zone for clock times in messages; default UTC. */
  timeZone?: string;
};

export type TransitionType = "raise" | "escalate" | "settle" | "update";

export type Transition = {
  type: TransitionType;
  subject: string;
  kind: RuleKind;
  /** On settle, the level the alert had. */
  level: AlertLevel;
  zoneId: string;
  probeId: number | null;
  value: number | null;
  message: string;
  details: Record<string, unknown>;
};
