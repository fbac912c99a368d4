import { describe, expect, it } from "vitest";
import { agoWords, clockWords, presenceWords, probePresence, silentRuleFor } from "@/lib/domain/probe-presence";
import { evaluateZone, resolveRules, type ProbeContext, type RuleRow } from "@/lib/domain/rules";
import { speciesProfiles } from "@/lib/domain/species";

// 03:00 UTC on 1 June 2025 is 05:00 in Berlin (CEST, UTC+2).
const t0 = Date.UTC(2025, 5, 1, 3, 0, 0);
const MIN = 60_000;
const at = (m: number) => new Date(t0 + m * MIN);
const BERLIN = "Europe/Berlin";
const fetida = speciesProfiles["eisenia-fetida"];
const defaults = resolveRules(fetida).silent_probe;

const presence = (p: { lastReadingAt?: Date | null; lastHeardAt?: Date | null; reportIntervalS?: number }, now: Date, rule = defaults) =>
  probePresence({ lastReadingAt: p.lastReadingAt ?? null, lastHeardAt: p.lastHeardAt ?? null, reportIntervalS: p.reportIntervalS ?? 60 }, rule, now);
const say = (p: Parameters<typeof presence>[0], now: Date, rule = defaults) => presenceWords(presence(p, now, rule), now, BERLIN);

describe("probe presence", () => {
  it("a probe whose last reading is 2 min old is reporting, with the time since in words", () => {
    expect(say({ lastReadingAt: at(0), lastHeardAt: at(0) }, at(2))).toEqual({ headline: "reporting", detail: "last reading 2 min ago" });
  });

  it("a probe reporting every minute is silent at 10 min without a report (the rule's minimum), not at 9", () => {
    expect(presence({ lastReadingAt: at(0), lastHeardAt: at(0) }, new Date(at(10).getTime() - 1)).state).toBe("reporting");
    const silent = presence({ lastReadingAt: at(0), lastHeardAt: at(0) }, at(10));
    expect(silent).toMatchObject({ state: "silent", silentSince: at(0), silentAfterMinutes: 10 });
    // The farm's clock, not the server's: 03:00 UTC is 05:00 in Berlin.
    expect(presenceWords(silent, at(10), BERLIN)).toEqual({
      headline: "silent since 05:00",
      detail: "last reading 10 min ago · silent after 10 min without a report",
    });
  });

  it("a probe reporting every 5 min is silent after three missed reports, 15 min", () => {
    const p = { lastReadingAt: at(0), lastHeardAt: at(0), reportIntervalS: 300 };
    expect(presence(p, at(14)).state).toBe("reporting");
    expect(presence(p, at(15))).toMatchObject({ state: "silent", silentAfterMinutes: 15 });
  });

  it("draws the same line as the silent-probe alert: raised exactly when the list says silent", () => {
    const probe: ProbeContext = { id: 4, code: "p-4", reportIntervalS: 120, lastSeenAt: null, metrics: ["temperature"] };
    const readings = [{ probeId: 4, metric: "temperature" as const, points: [{ t: at(0).getTime(), v: 22 }] }];
    const base = { zone: { id: "z", kind: "working", binName: "Tote 1" } as const, species: fetida, recentFeedings: [], openAlerts: [], readings };
    for (const minute of [9, 10, 11]) {
      const now = at(minute);
      const raised = evaluateZone({ ...base, now: now.getTime(), probes: [probe], kinds: ["silent_probe"] }).some((t) => t.type === "raise");
      expect([minute, raised]).toEqual([minute, presence({ lastReadingAt: at(0), reportIntervalS: 120 }, now).state === "silent"]);
    }
  });

  it("a probe with no open connection that reports (over HTTP) is reporting: the connection plays no part", () => {
    // HTTP ingest sets the last reading and last heard times alone; nothing here asks for a connection.
    expect(presence({ lastReadingAt: at(0), lastHeardAt: at(0) }, at(1)).state).toBe("reporting");
  });

  it("a probe never heard from says it has no reading yet, and is not silent however long", () => {
    const p = presence({}, at(60 * 24 * 30));
    expect(p).toMatchObject({ state: "no-reading-yet", silentSince: null });
    expect(presenceWords(p, at(0), BERLIN)).toEqual({ headline: "no reading yet", detail: "nothing heard from it yet" });
  });

  it("a probe heard from but with no reading has none yet, then goes silent like any other", () => {
    expect(say({ lastHeardAt: at(0) }, at(3))).toEqual({ headline: "no reading yet", detail: "heard from 3 min ago, no reading sent" });
    expect(say({ lastHeardAt: at(0) }, at(10))).toEqual({
      headline: "silent since 05:00",
      detail: "no reading yet · silent after 10 min without a report",
    });
  });

  it("any message heard after the last reading keeps it reporting, as it keeps the alert away", () => {
    expect(presence({ lastReadingAt: at(0), lastHeardAt: at(8) }, at(12))).toMatchObject({ state: "reporting", lastHeardAt: at(8) });
  });

  it("a silence from another day names the day", () => {
    const now = new Date(t0 + 26 * 60 * MIN);
    expect(say({ lastReadingAt: at(0), lastHeardAt: at(0) }, now).headline).toBe("silent since 1 Jun 05:00");
  });
});

describe("the silent-probe rule for a probe", () => {
  const rows: RuleRow[] = [
    { binId: null, kind: "silent_probe", thresholds: { minSilentMinutes: 30 }, enabled: true },
    { binId: "bin-b", kind: "silent_probe", thresholds: { missedReports: 5 }, enabled: true },
  ];

  it("follows the farm's override, with its bin's own laid over it", () => {
    expect(silentRuleFor(rows, { id: "bin-a", species: "eisenia-fetida" }).t).toMatchObject({ missedReports: 3, minSilentMinutes: 30 });
    expect(silentRuleFor(rows, { id: "bin-b", species: "eisenia-fetida" }).t).toMatchObject({ missedReports: 5, minSilentMinutes: 30 });
    // 5 missed reports of 10 min are 50 min, over the farm's 30-min minimum.
    expect(presence({ lastReadingAt: at(0), reportIntervalS: 600 }, at(49), silentRuleFor(rows, { id: "bin-b", species: "eisenia-fetida" })).state).toBe(
      "reporting",
    );
  });

  it("a probe not placed in a bin follows the farm's rule", () => {
    expect(silentRuleFor(rows, null).t).toMatchObject({ missedReports: 3, minSilentMinutes: 30 });
  });
});

describe("time words", () => {
  it("counts minutes, then hours, then gives the farm's date and time", () => {
    expect(agoWords(at(0), new Date(t0 + 30_000), BERLIN)).toBe("just now");
    expect(agoWords(at(0), at(59), BERLIN)).toBe("59 min ago");
    expect(agoWords(at(0), at(150), BERLIN)).toBe("2 h ago");
    expect(agoWords(at(0), at(60 * 30), BERLIN)).toBe("1 Jun 05:00");
    expect(clockWords(at(0), at(5), "UTC")).toBe("03:00");
  });
});
