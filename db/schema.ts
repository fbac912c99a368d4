import { sql } from "drizzle-orm";
import {
  bigserial,
  boolean,
  date,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  smallint,
  text,
  timestamp,
  unique,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import {
  ALERT_KINDS,
  ALERT_LEVELS,
  ALERT_STATES,
  BIN_STYLES,
  INGREDIENT_KINDS,
  METRICS_STORED,
  REJECT_SOURCES,
  ROLES,
  UNIT_SYSTEMS,
  ZONE_KINDS,
} from "../lib/domain/vocabulary";

export type { AlertKind, BinStyle, Metric, Role, ZoneKind } from "../lib/domain/vocabulary";

const ts = (name: string) => timestamp(name, { withTimezone: true });
const createdAt = () => ts("created_at").notNull().defaultNow();

export const roleEnum = pgEnum("role", ROLES);
export const unitSystemEnum = pgEnum("unit_system", UNIT_SYSTEMS);
export const binStyleEnum = pgEnum("bin_style", BIN_STYLES);
export const zoneKindEnum = pgEnum("zone_kind", ZONE_KINDS);
// The numeric metrics of lib/domain/metrics.ts (firmware is text and lives on the probe row).
export const metricEnum = pgEnum("metric", METRICS_STORED);
export const alertKindEnum = pgEnum("alert_kind", ALERT_KINDS);
export const alertLevelEnum = pgEnum("alert_level", ALERT_LEVELS);
export const alertStateEnum = pgEnum("alert_state", ALERT_STATES);
export const ingredientKindEnum = pgEnum("ingredient_kind", INGREDIENT_KINDS);
export const rejectSourceEnum = pgEnum("reject_source", REJECT_SOURCES);

export const farms = pgTable("farms", {
  id: uuid("id").primaryKey().defaultRandom(),
  name: text("name").notNull(),
  unitSystem: unitSystemEnum("unit_system").notNull().default("metric"),
  timezone: text("timezone").notNull().default("UTC"),
  // The farm-local day whose digest went out; a compare-and-set on it sends each day's digest once.
  digestSentOn: date("digest_sent_on", { mode: "string" }),
  // Days between feedings of a bin unless the bin says otherwise ("every few weeks": common practice).
  feedingIntervalDays: smallint("feeding_interval_days").notNull().default(21),
  createdAt: createdAt(),
});

export const users = pgTable(
  "users",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    email: text("email").notNull(),
    name: text("name").notNull(),
    passwordHash: text("password_hash").notNull(),
    // Quiet hours hold back heads-ups only; "HH:MM" in the user's timezone.
    quietFrom: text("quiet_from"),
    quietTo: text("quiet_to"),
    timezone: text("timezone").notNull().default("UTC"),
    // Raised by a password reset; a session token carrying an older version is refused.
    sessionVersion: integer("session_version").notNull().default(0),
    // Null until the person opens the link of their sign-up mail. Defaults to now: people who came
    // in by invitation (the link proved the address), existing accounts and the demo people count
    // as verified; only a sign-up writes null.
    emailVerifiedAt: ts("email_verified_at").defaultNow(),
    createdAt: createdAt(),
  },
  // Sign-in looks users up by e-mail, case-insensitively.
  (t) => [uniqueIndex("users_email_lower_uq").on(sql`lower(${t.email})`)],
);

export const memberships = pgTable(
  "memberships",
  {
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    farmId: uuid("farm_id")
      .notNull()
      .references(() => farms.id, { onDelete: "cascade" }),
    role: roleEnum("role").notNull(),
    createdAt: createdAt(),
  },
  // Every authorized request asks "which role has this user on this farm": the key answers it;
  // the farm index lists a farm's team.
  (t) => [primaryKey({ columns: [t.userId, t.farmId] }), index("memberships_farm_idx").on(t.farmId)],
);

export const invitations = pgTable(
  "invitations",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    farmId: uuid("farm_id")
      .notNull()
      .references(() => farms.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    role: roleEnum("role").notNull(),
    tokenHash: text("token_hash").notNull(),
    invitedBy: uuid("invited_by").references(() => users.id, { onDelete: "set null" }),
    expiresAt: ts("expires_at").notNull(),
    acceptedAt: ts("accepted_at"),
    createdAt: createdAt(),
  },
  // Accepting an invitation finds it by its token hash.
  (t) => [uniqueIndex("invitations_token_uq").on(t.tokenHash)],
);

export const passwordResets = pgTable(
  "password_resets",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    tokenHash: text("token_hash").notNull(),
    expiresAt: ts("expires_at").notNull(),
    usedAt: ts("used_at"),
    createdAt: createdAt(),
  },
  // A reset link finds its row by token hash; the mail rate limit counts a user's recent rows.
  (t) => [uniqueIndex("password_resets_token_uq").on(t.tokenHash), index("password_resets_user_idx").on(t.userId, t.createdAt)],
);

// Sign-up mails: "verify" rows carry the one-time link (its sha256 only); "notice" rows record a
// "you already have an account" mail, so both count toward one hourly limit per person.
export const emailVerifications = pgTable(
  "email_verifications",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    kind: text("kind", { enum: ["verify", "notice"] }).notNull(),
    tokenHash: text("token_hash").notNull(),
    expiresAt: ts("expires_at").notNull(),
    usedAt: ts("used_at"),
    createdAt: createdAt(),
  },
  // A link finds its row by token hash; the mail limit counts a person's recent rows.
  (t) => [uniqueIndex("email_verifications_token_uq").on(t.tokenHash), index("email_verifications_user_idx").on(t.userId, t.createdAt)],
);

export const bins = pgTable(
  "bins",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    farmId: uuid("farm_id")
      .notNull()
      .references(() => farms.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    style: binStyleEnum("style").notNull(),
    species: text("species").notNull(),
    lengthCm: real("length_cm"),
    widthCm: real("width_cm"),
    depthCm: real("depth_cm"),
    notes: text("notes"),
    // null = the farm's feeding interval.
    feedingIntervalDays: smallint("feeding_interval_days"),
    // The day the keeper means to harvest the harvest side; null = not planned.
    plannedHarvestOn: date("planned_harvest_on", { mode: "string" }),
    archivedAt: ts("archived_at"),
    createdAt: createdAt(),
  },
  // Today lists a farm's bins.
  (t) => [index("bins_farm_idx").on(t.farmId)],
);

export const zones = pgTable(
  "zones",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    binId: uuid("bin_id")
      .notNull()
      .references(() => bins.id, { onDelete: "cascade" }),
    position: smallint("position").notNull(),
    kind: zoneKindEnum("kind").notNull(),
    name: text("name"),
    archivedAt: ts("archived_at"),
    createdAt: createdAt(),
  },
  // Zones are ordered from the feeding side; one zone per position in a bin.
  (t) => [uniqueIndex("zones_bin_position_uq").on(t.binId, t.position)],
);

export const probes = pgTable(
  "probes",
  {
    id: integer("id").primaryKey().generatedAlwaysAsIdentity(),
    farmId: uuid("farm_id")
      .notNull()
      .references(() => farms.id, { onDelete: "cascade" }),
    zoneId: uuid("zone_id").references(() => zones.id, { onDelete: "set null" }),
    // The probe's MQTT user name and the segment of its topics.
    code: text("code").notNull(),
    label: text("label"),
    tokenHash: text("token_hash").notNull(),
    metrics: text("metrics")
      .array()
      .notNull()
      .default(sql`'{}'::text[]`),
    reportIntervalS: integer("report_interval_s").notNull().default(60),
    calibration: jsonb("calibration").$type<{
      slope: number;
      intercept: number;
      r2: number;
      fittedAt: string;
      points: number;
    } | null>(),
    lastSeenAt: ts("last_seen_at"),
    online: boolean("online").notNull().default(false),
    batteryV: real("battery_v"),
    signalDbm: real("signal_dbm"),
    firmware: text("firmware"),
    archivedAt: ts("archived_at"),
    createdAt: createdAt(),
  },
  // The broker authenticates by code; zone pages list their probes.
  (t) => [uniqueIndex("probes_code_uq").on(t.code), index("probes_zone_idx").on(t.zoneId)],
);

// A repeated reading (same probe, metric, time) is a no-op by this key. The table is partitioned
// by month on ts with pg_partman (migration 0007, db/migrations/0007_readings-by-month.sql), which
// drizzle cannot say: the key holds ts, the partition key, as a partitioned table's key must.
export const readings = pgTable(
  "readings",
  {
    probeId: integer("probe_id").notNull(),
    metric: metricEnum("metric").notNull(),
    ts: ts("ts").notNull(),
    value: doublePrecision("value").notNull(),
  },
  // The key doubles as the index for one probe's series over a time range.
  (t) => [primaryKey({ columns: [t.probeId, t.metric, t.ts] })],
);

export const readingRollups = pgTable(
  "reading_rollups",
  {
    probeId: integer("probe_id").notNull(),
    metric: metricEnum("metric").notNull(),
    hour: ts("hour").notNull(),
    min: doublePrecision("min").notNull(),
    max: doublePrecision("max").notNull(),
    sum: doublePrecision("sum").notNull(),
    count: integer("count").notNull(),
  },
  // Long chart ranges read one row per hour through this key instead of every raw reading.
  (t) => [primaryKey({ columns: [t.probeId, t.metric, t.hour] })],
);

// Days of the hourly rollups, cut at the probe's farm's midnight, for charts of months and a year
// (365 rows a line instead of 8,760). Written only by the deferred refresh in
// db/queries/daily-rollups.ts (never by the ingest writer); a chart reads these for the days the
// refresh has done (reading_daily_state) and the hourly rollups for the rest.
export const readingDailyRollups = pgTable(
  "reading_daily_rollups",
  {
    probeId: integer("probe_id").notNull(),
    metric: metricEnum("metric").notNull(),
    /** The instant the farm's day starts (its local midnight). */
    day: ts("day").notNull(),
    min: doublePrecision("min").notNull(),
    max: doublePrecision("max").notNull(),
    sum: doublePrecision("sum").notNull(),
    count: integer("count").notNull(),
  },
  (t) => [primaryKey({ columns: [t.probeId, t.metric, t.day] })],
);

// How far the daily rollups of each probe are done, and in which time zone they were cut.
export const readingDailyState = pgTable("reading_daily_state", {
  probeId: integer("probe_id").primaryKey(),
  timezone: text("timezone").notNull(),
  /** A local midnight: every day before it is in reading_daily_rollups. */
  doneThrough: ts("done_through").notNull(),
});

export const rejectedMessages = pgTable(
  "rejected_messages",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    farmId: uuid("farm_id"),
    probeId: integer("probe_id"),
    source: rejectSourceEnum("source").notNull(),
    topic: text("topic"),
    receivedAt: ts("received_at").notNull().defaultNow(),
    reason: text("reason").notNull(),
    // One row per refused message: how many of its records were refused (reason holds the first few).
    records: integer("records").notNull().default(1),
    excerpt: text("excerpt"),
  },
  // An operator reads a probe's latest rejections first.
  (t) => [index("rejected_probe_time_idx").on(t.probeId, t.receivedAt)],
);

export type RuleThresholds = Record<string, number>;

export const rules = pgTable(
  "rules",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    farmId: uuid("farm_id")
      .notNull()
      .references(() => farms.id, { onDelete: "cascade" }),
    // null = every bin of the farm; a bin's own rule overrides the farm's.
    binId: uuid("bin_id").references(() => bins.id, { onDelete: "cascade" }),
    kind: alertKindEnum("kind").notNull(),
    thresholds: jsonb("thresholds").$type<RuleThresholds>().notNull().default({}),
    enabled: boolean("enabled").notNull().default(true),
    updatedAt: ts("updated_at").notNull().defaultNow(),
  },
  // One override per kind per scope.
  (t) => [unique("rules_scope_kind_uq").on(t.farmId, t.binId, t.kind).nullsNotDistinct()],
);

export const alerts = pgTable(
  "alerts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    farmId: uuid("farm_id")
      .notNull()
      .references(() => farms.id, { onDelete: "cascade" }),
    binId: uuid("bin_id")
      .notNull()
      .references(() => bins.id, { onDelete: "cascade" }),
    zoneId: uuid("zone_id").references(() => zones.id, { onDelete: "cascade" }),
    probeId: integer("probe_id").references(() => probes.id, { onDelete: "set null" }),
    kind: alertKindEnum("kind").notNull(),
    level: alertLevelEnum("level").notNull(),
    state: alertStateEnum("state").notNull().default("raised"),
    // What the alert is about (zone + kind, or probe + kind); one open alert per subject.
    subject: text("subject").notNull(),
    value: doublePrecision("value"),
    message: text("message").notNull(),
    details: jsonb("details").$type<Record<string, unknown>>().notNull().default({}),
    raisedAt: ts("raised_at").notNull().defaultNow(),
    claimedAt: ts("claimed_at"),
    claimedBy: uuid("claimed_by").references(() => users.id, { onDelete: "set null" }),
    settledAt: ts("settled_at"),
    lastSentAt: ts("last_sent_at"),
    // When it became act now (raised so, or escalated from a heads-up): the 15-minute clock.
    actNowAt: ts("act_now_at"),
    // When the last unclaimed act-now reminder went to every keeper and the owners' mail.
    remindedAt: ts("reminded_at"),
    // Reminders sent so far: each waits twice as long as the one before, and they stop at a bound.
    reminderCount: smallint("reminder_count").notNull().default(0),
  },
  (t) => [
    // Two ingest nodes racing to raise the same alert: the second insert conflicts here.
    uniqueIndex("alerts_open_subject_uq")
      .on(t.subject)
      .where(sql`state <> 'settled'`),
    // Today shows a farm's open alerts, newest first.
    index("alerts_farm_state_idx").on(t.farmId, t.state, t.raisedAt),
  ],
);

export const alertEvents = pgTable(
  "alert_events",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    alertId: uuid("alert_id")
      .notNull()
      .references(() => alerts.id, { onDelete: "cascade" }),
    at: ts("at").notNull().defaultNow(),
    type: text("type").notNull(),
    userId: uuid("user_id").references(() => users.id, { onDelete: "set null" }),
    channel: text("channel"),
    detail: jsonb("detail").$type<Record<string, unknown>>().notNull().default({}),
  },
  // An alert's history is read in order.
  (t) => [index("alert_events_alert_idx").on(t.alertId, t.at)],
);

export const pushSubscriptions = pgTable(
  "push_subscriptions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    endpoint: text("endpoint").notNull(),
    p256dh: text("p256dh").notNull(),
    auth: text("auth").notNull(),
    userAgent: text("user_agent"),
    createdAt: createdAt(),
  },
  // A browser re-subscribing with the same endpoint updates that person's row, never another's;
  // sending lists a user's.
  (t) => [uniqueIndex("push_user_endpoint_uq").on(t.userId, t.endpoint), index("push_user_idx").on(t.userId)],
);

// The outbox of alert deliveries: the rule runner only inserts rows; workers on any ingest node
// claim due rows with FOR UPDATE SKIP LOCKED, send with a timeout, and retry with backoff, so one
// slow push service never holds up another farm's alert.
export const deliveries = pgTable(
  "deliveries",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    // Unique per send (alert, reason, round, person, channel, subscription): a repeat insert is a no-op.
    dedupeKey: text("dedupe_key").notNull(),
    farmId: uuid("farm_id").references(() => farms.id, { onDelete: "cascade" }),
    alertId: uuid("alert_id").references(() => alerts.id, { onDelete: "cascade" }),
    userId: uuid("user_id").references(() => users.id, { onDelete: "cascade" }),
    subscriptionId: uuid("subscription_id").references(() => pushSubscriptions.id, { onDelete: "cascade" }),
    channel: text("channel").notNull(),
    reason: text("reason").notNull(),
    payload: jsonb("payload").$type<Record<string, unknown>>().notNull().default({}),
    // pending → sending → sent | failed | gone | dropped
    state: text("state").notNull().default("pending"),
    attempts: integer("attempts").notNull().default(0),
    nextAttemptAt: ts("next_attempt_at").notNull().defaultNow(),
    lockedUntil: ts("locked_until"),
    lastStatus: integer("last_status"),
    // In our own words; a remote service's answer body is never stored.
    lastReason: text("last_reason"),
    sentAt: ts("sent_at"),
    createdAt: createdAt(),
  },
  (t) => [
    uniqueIndex("deliveries_dedupe_uq").on(t.dedupeKey),
    // Workers claim the oldest due rows that are still to be sent.
    index("deliveries_due_idx")
      .on(t.nextAttemptAt)
      .where(sql`state in ('pending', 'sending')`),
    index("deliveries_alert_idx").on(t.alertId),
  ],
);

// Failed sign-ins, counted per account and per client address over a sliding window; kept in the
// database so the limit holds across web processes.
export const signInFailures = pgTable(
  "sign_in_failures",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    // "account:<lower e-mail>" or "address:<client address>"
    key: text("key").notNull(),
    at: ts("at").notNull().defaultNow(),
  },
  // The limit counts one key's recent failures.
  (t) => [index("sign_in_failures_key_at_idx").on(t.key, t.at)],
);

export const ingredients = pgTable(
  "ingredients",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    // null = the shared library seeded from published tables; otherwise a farm's own.
    farmId: uuid("farm_id").references(() => farms.id, { onDelete: "cascade" }),
    key: text("key").notNull(),
    name: text("name").notNull(),
    kind: ingredientKindEnum("kind").notNull(),
    // Published tables leave some values blank; a feeding item then asks the keeper for them.
    moisturePct: real("moisture_pct"),
    carbonPct: real("carbon_pct"),
    nitrogenPct: real("nitrogen_pct"),
    cn: real("cn"),
    source: text("source").notNull(),
    // V = read in the source, V-2nd = secondary copy, M = from memory, gap = no value found.
    sourceStatus: text("source_status").notNull().default("V"),
    note: text("note"),
    createdAt: createdAt(),
  },
  // The mix check lists the library plus a farm's own by key.
  (t) => [unique("ingredients_farm_key_uq").on(t.farmId, t.key).nullsNotDistinct()],
);

const logColumns = () => ({
  id: uuid("id").primaryKey().defaultRandom(),
  farmId: uuid("farm_id")
    .notNull()
    .references(() => farms.id, { onDelete: "cascade" }),
  binId: uuid("bin_id")
    .notNull()
    .references(() => bins.id, { onDelete: "cascade" }),
  zoneId: uuid("zone_id").references(() => zones.id, { onDelete: "set null" }),
  at: ts("at").notNull().defaultNow(),
  byUserId: uuid("by_user_id").references(() => users.id, { onDelete: "set null" }),
  notes: text("notes"),
  // The phone's idempotency key: an entry sent again (offline queue, lost answer) is stored once.
  clientKey: text("client_key"),
  createdAt: createdAt(),
});

export const feedings = pgTable(
  "feedings",
  {
    ...logColumns(),
    mixMoisturePct: real("mix_moisture_pct"),
    mixCn: real("mix_cn"),
    totalKg: real("total_kg"),
  },
  // The logbook and the heat rule read a bin's recent feedings.
  (t) => [index("feedings_bin_at_idx").on(t.binId, t.at), uniqueIndex("feedings_client_key_uq").on(t.farmId, t.clientKey)],
);

export const feedingItems = pgTable(
  "feeding_items",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    feedingId: uuid("feeding_id")
      .notNull()
      .references(() => feedings.id, { onDelete: "cascade" }),
    ingredientId: uuid("ingredient_id").references(() => ingredients.id, { onDelete: "set null" }),
    name: text("name").notNull(),
    massKg: real("mass_kg").notNull(),
    moisturePct: real("moisture_pct").notNull(),
    carbonPct: real("carbon_pct"),
    nitrogenPct: real("nitrogen_pct"),
  },
  // A feeding's items are read with it.
  (t) => [index("feeding_items_feeding_idx").on(t.feedingId)],
);

export const waterings = pgTable(
  "waterings",
  { ...logColumns(), litres: real("litres").notNull() },
  // The logbook reads a bin's entries by time.
  (t) => [index("waterings_bin_at_idx").on(t.binId, t.at), uniqueIndex("waterings_client_key_uq").on(t.farmId, t.clientKey)],
);

export const harvests = pgTable(
  "harvests",
  // volume_l: castings as measured by the bucket, beside their mass (optional).
  { ...logColumns(), massKg: real("mass_kg").notNull(), volumeL: real("volume_l") },
  // The logbook reads a bin's entries by time.
  (t) => [index("harvests_bin_at_idx").on(t.binId, t.at), uniqueIndex("harvests_client_key_uq").on(t.farmId, t.clientKey)],
);

export const logNotes = pgTable(
  "log_notes",
  { ...logColumns(), text: text("text").notNull() },
  // The logbook reads a bin's entries by time.
  (t) => [index("log_notes_bin_at_idx").on(t.binId, t.at), uniqueIndex("log_notes_client_key_uq").on(t.farmId, t.clientKey)],
);

// Material moved from the feeding side toward the harvest side (flow-through, wedge and windrow bins):
// zone_id is where it came from, to_zone_id where it went.
export const shifts = pgTable(
  "shifts",
  {
    ...logColumns(),
    toZoneId: uuid("to_zone_id").references(() => zones.id, { onDelete: "set null" }),
    // How much was moved, if the keeper estimated it.
    volumeL: real("volume_l"),
  },
  // The logbook reads a bin's entries by time.
  (t) => [index("shifts_bin_at_idx").on(t.binId, t.at), uniqueIndex("shifts_client_key_uq").on(t.farmId, t.clientKey)],
);

export const ovenDrySamples = pgTable(
  "oven_dry_samples",
  {
    ...logColumns(),
    probeId: integer("probe_id").references(() => probes.id, { onDelete: "set null" }),
    wetMassG: real("wet_mass_g").notNull(),
    dryMassG: real("dry_mass_g").notNull(),
    tareG: real("tare_g").notNull().default(0),
    ovenTempC: real("oven_temp_c"),
    rawReading: doublePrecision("raw_reading"),
    moistureWbPct: real("moisture_wb_pct").notNull(),
  },
  // Calibration fits a probe's samples.
  (t) => [index("samples_probe_idx").on(t.probeId, t.at), uniqueIndex("samples_client_key_uq").on(t.farmId, t.clientKey)],
);

export const imports = pgTable(
  "imports",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    farmId: uuid("farm_id")
      .notNull()
      .references(() => farms.id, { onDelete: "cascade" }),
    byUserId: uuid("by_user_id").references(() => users.id, { onDelete: "set null" }),
    fileName: text("file_name").notNull(),
    fileSha256: text("file_sha256").notNull(),
    mapping: jsonb("mapping").$type<Record<string, string>>().notNull().default({}),
    rowsTotal: integer("rows_total").notNull().default(0),
    rowsStored: integer("rows_stored").notNull().default(0),
    rowsRejected: integer("rows_rejected").notNull().default(0),
    report: jsonb("report").$type<{ line: number; reason: string }[]>().notNull().default([]),
    createdAt: createdAt(),
  },
  // A farm's import history, newest first.
  (t) => [index("imports_farm_idx").on(t.farmId, t.createdAt)],
);

export type Farm = typeof farms.$inferSelect;
export type Delivery = typeof deliveries.$inferSelect;
export type User = typeof users.$inferSelect;
export type Membership = typeof memberships.$inferSelect;
export type Invitation = typeof invitations.$inferSelect;
export type PasswordReset = typeof passwordResets.$inferSelect;
export type EmailVerification = typeof emailVerifications.$inferSelect;
export type Bin = typeof bins.$inferSelect;
export type Zone = typeof zones.$inferSelect;
export type Probe = typeof probes.$inferSelect;
export type Reading = typeof readings.$inferInsert;
export type Alert = typeof alerts.$inferSelect;
