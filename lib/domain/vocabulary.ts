// The product's words, declared once. db/schema.ts builds its PostgreSQL enums from these lists,
// the schemas in lib/domain/validation build their choices from them, and the screens name them
// through the word tables beside each (team-words, alert-words, species, metrics).

export const ROLES = ["owner", "keeper", "viewer"] as const;
export type Role = (typeof ROLES)[number];

export const UNIT_SYSTEMS = ["metric", "imperial"] as const;
export type UnitSystem = (typeof UNIT_SYSTEMS)[number];

export const BIN_STYLES = ["flow-through", "tray stack", "tote", "bed", "windrow"] as const;
export type BinStyle = (typeof BIN_STYLES)[number];

/** A zone's place in the bin's cycle: fed, working, curing toward harvest (common practice). */
export const ZONE_KINDS = ["fresh", "working", "curing"] as const;
export type ZoneKind = (typeof ZONE_KINDS)[number];

/** What a stored reading measures. Firmware is reported by probes but kept on the probe, not here. */
export const METRICS_STORED = ["temperature", "moisture", "moisture-raw", "ammonia", "battery-voltage", "battery-level", "signal"] as const;
export type Metric = (typeof METRICS_STORED)[number];

export const ALERT_KINDS = ["heat", "chill", "drying", "soggy", "ammonia", "silent_probe", "probe_fault"] as const;
export type AlertKind = (typeof ALERT_KINDS)[number];

export const ALERT_LEVELS = ["heads_up", "act_now"] as const;
export type AlertLevel = (typeof ALERT_LEVELS)[number];

export const ALERT_STATES = ["raised", "claimed", "settled"] as const;
export type AlertState = (typeof ALERT_STATES)[number];
/** The states of an alert that still asks something of the crew. */
export const OPEN_ALERT_STATES = ["raised", "claimed"] as const satisfies readonly AlertState[];

export const INGREDIENT_KINDS = ["bedding", "feedstock", "water"] as const;
export type IngredientKind = (typeof INGREDIENT_KINDS)[number];

export const REJECT_SOURCES = ["mqtt", "http", "csv"] as const;
export type RejectSource = (typeof REJECT_SOURCES)[number];

export const SPECIES_IDS = ["eisenia-fetida", "eisenia-hortensis", "eudrilus-eugeniae", "perionyx-excavatus"] as const;
export type SpeciesId = (typeof SPECIES_IDS)[number];

/** The kinds of logbook entry, as the logbook lists them and the undo names them. */
export const LOG_KINDS = ["feeding", "watering", "shift", "harvest", "note", "sample"] as const;
export type LogKind = (typeof LOG_KINDS)[number];

// The broker's topics: one family per probe under one root. The probe sends readings (SenML) to
// its readings topic and says whether it is there on its presence topic (a birth message and its
// MQTT will); messages for the probe go to its for-probe topic, the one it may subscribe to.
export const TOPIC_ROOT = "wormward";
export const PROBE_TOPICS = ["readings", "presence", "for-probe"] as const;
export type ProbeTopic = (typeof PROBE_TOPICS)[number];
/** A probe's topics, by what each carries. */
export const probeTopics = (code: string) => ({
  readings: `${TOPIC_ROOT}/${code}/readings`,
  presence: `${TOPIC_ROOT}/${code}/presence`,
  forProbe: `${TOPIC_ROOT}/${code}/for-probe`,
});

/** What a presence message says: the probe has connected ("here"), or its connection ended ("gone", as its will). */
export const PRESENCE_WORDS = ["here", "gone"] as const;
export type PresenceWord = (typeof PRESENCE_WORDS)[number];
export const PRESENCE_HERE = "here" satisfies PresenceWord;
export const PRESENCE_GONE = "gone" satisfies PresenceWord;

/** How the probe list tells a probe's reporting, on the silent-probe rule's line (lib/domain/probe-presence.ts). */
export const PROBE_PRESENCE = ["reporting", "silent", "no-reading-yet"] as const;
export type ProbePresenceState = (typeof PROBE_PRESENCE)[number];
