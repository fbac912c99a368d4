// The rule preview's own pieces (lib/server/rules/preview.ts): the steps it replays at, how it turns
// replay()'s transitions into alerts, the overrides a save would give, and the trimmed lookback,
// which must leave the previewed kind's transitions exactly as the full lookback gives them.
import { describe, expect, it } from "vitest";
import { replay, resolveRules, type ReplayInput, type ReplayStep, type RuleRow } from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";
import { alertSpans, countLevels, lookbackSizing, previewTimes, proposedOverrides } from "@/lib/server/rules/preview";
import { heatHistory } from "../integration/rules-preview/fixtures";

const MINUTE = 60_000;
const HOUR = 3_600_000;
const DAY = 86_400_000;

const t = (type: "raise" | "escalate" | "settle" | "update", subject: string, level: "heads_up" | "act_now") =>
  ({ type, subject, kind: "heat", level, zoneId: "z", probeId: null, value: null, message: "", details: {} }) as const;

describe("the rule preview's pieces", () => {
  it("steps on the grid, at each feeding inside the window and at its end, once each, in order", () => {
    const times = previewTimes(1_000, 31 * MINUTE + 5, 10 * MINUTE, [15 * MINUTE, 20 * MINUTE, 40 * MINUTE]);
    expect(times).toEqual([10 * MINUTE, 15 * MINUTE, 20 * MINUTE, 30 * MINUTE, 31 * MINUTE + 5]);
  });

  it("an alert that escalates counts once, as act now; one still open at the end has no end", () => {
    const steps: ReplayStep[] = [
      { at: 1, transitions: [t("raise", "a", "heads_up")], open: [] },
      { at: 2, transitions: [t("escalate", "a", "act_now"), t("raise", "b", "heads_up")], open: [] },
      { at: 3, transitions: [t("settle", "a", "act_now"), t("update", "b", "heads_up")], open: [] },
      { at: 4, transitions: [t("raise", "a", "heads_up")], open: [] },
    ];
    const spans = alertSpans(steps);
    expect(spans).toEqual([
      { subject: "a", level: "act_now", from: 1, to: 3, escalatedAt: 2 },
      { subject: "b", level: "heads_up", from: 2, to: null, escalatedAt: null },
      { subject: "a", level: "heads_up", from: 4, to: null, escalatedAt: null },
    ]);
    expect(countLevels(spans)).toEqual({ heads_up: 2, act_now: 1 });
  });

  it("the proposed overrides replace the bin's row of the kind, as a save would, over the farm's", () => {
    const rows: RuleRow[] = [
      { binId: null, kind: "heat", enabled: true, thresholds: { actNowAtC: 31 } },
      { binId: "b", kind: "heat", enabled: true, thresholds: { headsUpAboveC: 26, raiseMinutes: 20 } },
      { binId: "other", kind: "heat", enabled: false, thresholds: {} },
    ];
    expect(proposedOverrides(rows, "b", { kind: "heat", enabled: true, thresholds: { headsUpAboveC: 23 } })).toEqual({
      heat: { enabled: true, thresholds: { actNowAtC: 31, headsUpAboveC: 23 } },
    });
  });

  it("the trimmed lookback gives the heat rule the same transitions as the full one, feedings and hot spells included", () => {
    // NC State Extension "Earthworms and Worm Bins": ideal 15–25 °C, so spells at 27 °C cross the heads-up line.
    const now = Math.floor(Date.now() / MINUTE) * MINUTE;
    const points = heatHistory(
      now,
      [
        { dayAgo: 5, peak: 27, holdH: 3 },
        { dayAgo: 3, peak: 31, holdH: 2 },
        { dayAgo: 1.5, peak: 24, holdH: 1 },
      ],
      5,
      7,
    );
    const species = speciesProfiles["eisenia-fetida"];
    const overrides = { heat: { enabled: true, thresholds: { headsUpAboveC: 23.5 } } };
    const input: ReplayInput = {
      zone: { id: "z", kind: "fresh", binName: "b" },
      species,
      overrides,
      readings: [{ probeId: 1, metric: "temperature", points }],
      recentFeedings: [{ at: now - 3 * DAY - 2 * HOUR, zoneId: null, totalKg: 4, mixMoisturePct: 80, mixCn: 20 }],
      probes: [{ id: 1, code: "p", reportIntervalS: 300, lastSeenAt: now, metrics: ["temperature"] }],
      kinds: ["heat"],
    };
    const times = previewTimes(now - 6 * DAY, now, 10 * MINUTE);
    const said = (steps: ReplayStep[]) => steps.flatMap((s) => s.transitions.map((x) => `${s.at} ${x.type} ${x.level}`));
    const full = said(replay(input, times));
    const trimmed = said(replay({ ...input, overrides: lookbackSizing("heat", overrides), rules: resolveRules(species, overrides) }, times));
    expect(full.filter((x) => x.includes("raise")).length).toBeGreaterThanOrEqual(3);
    expect(full.some((x) => x.includes("escalate") || x.includes("raise act_now"))).toBe(true);
    expect(trimmed).toEqual(full);
  });
});
