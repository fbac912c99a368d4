// The data the browser receives, named once. Each type is a server answer as JSON carries it
// (lib/domain/wire.ts: dates become ISO strings), so a component that reads `raisedAt` knows it is
// a string whether the page primed the cache or the API answered. This is the one file where a
// row's type (never its code: type imports only) crosses into the client layer.
import type { FeedingEntry } from "@/db/queries/feedings";
import type { listIngredients } from "@/db/queries/ingredients";
import type { LogbookEntry } from "@/db/queries/logbook";
import type { BinSeriesAnswer, SeriesAnswer } from "@/db/queries/series";
import type { Today as TodayRow } from "@/db/queries/today";
import type { Zone } from "@/db/schema";
import type { Wire } from "@/lib/domain/wire";
import type { addBin } from "@/lib/server/bins/add-bin";
import type { ImportOutcome } from "@/lib/server/imports/import-csv";
import type { logFeeding } from "@/lib/server/logbook/log-feeding";
import type { farmLogbookPage } from "@/lib/server/logbook/farm-logbook";
import type { logShift } from "@/lib/server/logbook/log-shift";
import type { addSample } from "@/lib/server/probes/add-sample";
import type { calibrationView } from "@/lib/server/probes/calibration-view";
import type { fitProbeCalibration } from "@/lib/server/probes/fit-calibration";
import type { listProbes } from "@/lib/server/probes/list-probes";
import type { probeHealth } from "@/lib/server/probes/probe-health";
import type { registerProbe } from "@/lib/server/probes/register";
import type { rotateProbeToken } from "@/lib/server/probes/rotate-token";
import type { pushPublicKey } from "@/lib/server/push/public-key";
import type { testPush } from "@/lib/server/push/test-push";
import type { binRulesView } from "@/lib/server/rules/bin-rules-view";
import type { previewBinRule } from "@/lib/server/rules/preview";

type Answer<F extends (...args: never[]) => unknown> = Wire<Awaited<ReturnType<F>>>;

/** A logbook feeding with its items and who logged it. */
export type Feeding = Wire<FeedingEntry>;
export type FeedingItem = Feeding["items"][number];
/** What logging a feeding answers: the feeding and its mix check. */
export type LoggedFeeding = Answer<typeof logFeeding>["answer"];
/** A zone of a bin as the logbook forms offer it. */
export type ZoneChoice = Pick<Wire<Zone>, "id" | "kind" | "name">;
/** A library or farm ingredient. */
export type IngredientRow = Answer<typeof listIngredients>[number];
/** One entry of a bin's merged logbook. */
export type LogbookItem = Wire<LogbookEntry>;
/** One page of the farm logbook: entries and the next older page's cursor (null at the end). */
export type FarmLogbookPage = Answer<typeof farmLogbookPage>;
/** What logging a shift answers. */
export type LoggedShift = Answer<typeof logShift>;
/** A zone's or probe's series for one metric and window. */
export type Series = Wire<SeriesAnswer>;
/** A bin's series for one metric and window: one line per zone, with the bin's logbook marks. */
export type BinSeries = Wire<BinSeriesAnswer>;
/** The farm's Today board: bins, zones, latest readings, open alerts. */
export type Today = Wire<TodayRow>;
export type TodayBin = Today["bins"][number];
export type TodayZone = TodayBin["zones"][number];
/** The farm's probes with presence, battery and place, and the farm's time zone to say times in. */
export type ProbeList = Answer<typeof listProbes>;
export type ProbeRow = ProbeList["probes"][number];
/** One probe's presence, latest values and latest refused messages in plain words. */
export type ProbeHealth = Answer<typeof probeHealth>;
/** A probe's oven-dry samples, its fitted line and each sample's residual. */
export type CalibrationView = Answer<typeof calibrationView>;
/** What registering a probe answers: the probe and its one-time token. */
export type RegisteredProbe = Answer<typeof registerProbe>;
/** What recording an oven-dry sample answers. */
export type RecordedSample = Answer<typeof addSample>["answer"];
/** What fitting a probe's calibration answers: the line, its residuals and the raw range sampled. */
export type FittedCalibration = Answer<typeof fitProbeCalibration>;
/** A probe's new token, shown once. */
export type RotatedToken = Answer<typeof rotateProbeToken>;
/** A bin's alert rules: each kind's species defaults, the owners' overrides and what applies. */
export type BinRules = Answer<typeof binRulesView>;
export type RuleKindRow = BinRules["defaults"][number];
export type RuleParam = RuleKindRow["params"][number];
/** What an unsaved change to one kind would have raised over the bin's last 30 days, beside the saved rules. */
export type RulePreview = Answer<typeof previewBinRule>;
/** A new bin with its zones. */
export type AddedBin = Answer<typeof addBin>;
/** What importing a logger CSV answers. */
export type ImportResult = Wire<ImportOutcome>;
/** The VAPID public key a browser subscribes with. */
export type PushKey = Answer<typeof pushPublicKey>;
/** How many of the caller's phones a test push reached. */
export type PushTestResult = Answer<typeof testPush>;
