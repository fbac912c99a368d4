import { describe, expect, it } from "vitest";
import {
  ALERT_KINDS,
  RULE_PARAMETERS,
  applyTransitions,
  checkThresholds,
  defaultRuleTable,
  lookback,
  overridesFromRuleRows,
  probeSubject,
  resolveRules,
  zoneSubject,
} from "@/lib/domain/rules";
import { alertKindEnum } from "@/db/schema";
import { feedingLoad } from "@/lib/domain/rules/context";
import { BAND_SOURCES } from "@/lib/domain/rules/summary";
import { SPECIES_IDS, speciesProfiles } from "@/lib/domain/species";

const fetida = speciesProfiles["eisenia-fetida"];
const HOUR = 3_600_000;

describe("the default rule table", () => {
  it("covers every alert kind of the schema", () => {
    expect([...ALERT_KINDS].sort()).toEqual([...alertKindEnum.enumValues].sort());
  });

  it("takes its lines from the species profile", () => {
    for (const id of SPECIES_IDS) {
      const s = speciesProfiles[id];
      const r = resolveRules(s);
      expect(r.heat.t.headsUpAboveC).toBe(s.temperatureC.comfortHigh);
      expect(r.heat.t.actNowAtC).toBe(s.temperatureC.warmStress);
      expect(r.chill.t.headsUpBelowC).toBe(s.temperatureC.comfortLow);
      // issue 11: act now only near the cold that kills (NC State Extension: E. fetida survives 0 °C), 2 °C margin common practice
      expect(r.chill.t.actNowBelowC).toBe(s.temperatureC.lethalCold + 2);
      expect(r.drying.t.headsUpBelowPct).toBe(s.moisturePct.comfortLow);
      expect(r.soggy.t.headsUpAbovePct).toBe(s.moisturePct.comfortHigh);
      expect(r.drying.t.actNowBelowPct).toBe((s.moisturePct.lethalDry + s.moisturePct.comfortLow) / 2);
      expect(r.soggy.t.actNowAbovePct).toBe(s.moisturePct.lethalWet);
    }
    // E. fetida, the usual case: NC State Extension 15–25 °C, Loehr et al. 1985 growth reduced at 30 °C
    expect(resolveRules(fetida).heat.t).toMatchObject({ headsUpAboveC: 25, actNowAtC: 30, raiseMinutes: 10, settleMinutes: 15, deadbandC: 0.5 });
  });

  it("names a source for every number, and marks the unsourced ones", () => {
    const table = defaultRuleTable(fetida);
    expect(table.map((k) => k.kind)).toEqual([...ALERT_KINDS]);
    for (const k of table) {
      for (const p of k.params) {
        expect(p.source.length).toBeGreaterThan(5);
        expect(Number.isFinite(p.value)).toBe(true);
      }
    }
    const src = (kind: keyof typeof RULE_PARAMETERS, key: string) => RULE_PARAMETERS[kind].find((p) => p.key === key)!.source;
    expect(src("heat", "riseRateCPerHour")).toBe("common practice");
    expect(src("ammonia", "actNowAtPpm")).toContain("from memory");
    expect(src("ammonia", "headsUpAtPpm")).toContain("common practice");
    expect(src("heat", "headsUpAboveC")).toContain("species");
  });
});

describe("owner overrides", () => {
  it("change any number and leave the rest at the species default", () => {
    const r = resolveRules(fetida, { heat: { thresholds: { actNowAtC: 28, riseRateCPerHour: 1.5 } }, chill: { enabled: false } });
    expect(r.heat.t.actNowAtC).toBe(28);
    expect(r.heat.t.riseRateCPerHour).toBe(1.5);
    expect(r.heat.t.headsUpAboveC).toBe(25);
    expect(r.chill.enabled).toBe(false);
    expect(r.heat.enabled).toBe(true);
  });

  it("are checked: unknown keys, non-numbers and negative durations are refused, good keys kept", () => {
    expect(checkThresholds("heat", { actNowAtC: 29 })).toEqual({ ok: true, value: { actNowAtC: 29 } });
    expect(checkThresholds("heat", { hotterThan: 29 })).toMatchObject({ ok: false, error: { field: "thresholds.hotterThan" } });
    expect(checkThresholds("heat", { actNowAtC: "29" })).toMatchObject({ ok: false, error: { field: "thresholds.actNowAtC" } });
    expect(checkThresholds("heat", { settleMinutes: -1 })).toMatchObject({ ok: false });
    expect(checkThresholds("heat", { deadbandC: -0.5 })).toMatchObject({ ok: false });
    // the heavy-feed line and the rhythm's days are the owner's too, never below zero
    expect(checkThresholds("heat", { heavyFeedKgPerM2: 6 })).toEqual({ ok: true, value: { heavyFeedKgPerM2: 6 } });
    expect(checkThresholds("heat", { heavyFeedKgPerM2: -1 })).toMatchObject({ ok: false, error: { field: "thresholds.heavyFeedKgPerM2" } });
    expect(checkThresholds("heat", { rhythmDays: -2 })).toMatchObject({ ok: false });
    // a line may be below zero: a chill line of −2 °C is a temperature, not a duration
    expect(checkThresholds("chill", { actNowBelowC: -2 })).toMatchObject({ ok: true });
    const r = resolveRules(fetida, { heat: { thresholds: { actNowAtC: 29, settleMinutes: -5, nonsense: 1, deadbandC: Number.NaN } } });
    expect(r.heat.t).toMatchObject({ actNowAtC: 29, settleMinutes: 15, deadbandC: 0.5 });
    expect("nonsense" in r.heat.t).toBe(false);
  });

  it("a bin's rule lies over the farm's, key by key", () => {
    const o = overridesFromRuleRows(
      [
        { binId: "bin-b", kind: "heat", thresholds: { actNowAtC: 27 }, enabled: true },
        { binId: null, kind: "heat", thresholds: { actNowAtC: 29, raiseMinutes: 5 }, enabled: true },
        { binId: null, kind: "chill", thresholds: {}, enabled: false },
        { binId: "bin-a", kind: "heat", thresholds: { actNowAtC: 28 }, enabled: true },
        { binId: "bin-a", kind: "drying", thresholds: {}, enabled: false },
      ],
      "bin-a",
    );
    expect(o.heat).toEqual({ enabled: true, thresholds: { actNowAtC: 28, raiseMinutes: 5 } });
    expect(o.chill).toEqual({ enabled: false, thresholds: {} });
    expect(o.drying?.enabled).toBe(false);
    expect(o.soggy).toBeUndefined();
  });
});

describe("plumbing for the runner", () => {
  it("asks for the rhythm's days plus a slow probe's window and the holds, and the feedings of the longest watch", () => {
    const lb = lookback(resolveRules(fetida));
    // 3 days of daily rhythm + a 3 h rate window (three hourly reports) + 60 min silent-probe settle + 1 h spare
    expect(lb.readingsMs).toBe(72 * HOUR + 3 * HOUR + 60 * 60_000 + HOUR);
    expect(lb.feedingsMs).toBe(96 * HOUR + lb.readingsMs);
    expect(lookback(resolveRules(fetida, { heat: { thresholds: { rhythmDays: 5 } } })).readingsMs).toBe(120 * HOUR + 3 * HOUR + 60 * 60_000 + HOUR);
  });

  it("names subjects by zone or probe", () => {
    expect(zoneSubject("z-1", "heat")).toBe("zone:z-1:heat");
    expect(probeSubject(12, "silent_probe")).toBe("probe:12:silent_probe");
  });

  it("applies transitions as the alerts table would", () => {
    const base = { kind: "heat" as const, zoneId: "z", probeId: 1, value: 26, details: {} };
    let open = applyTransitions([], [{ ...base, type: "raise", subject: "zone:z:heat", level: "heads_up", message: "a" }], 1000);
    expect(open).toEqual([expect.objectContaining({ subject: "zone:z:heat", level: "heads_up", state: "raised", raisedAt: 1000, message: "a" })]);
    open = applyTransitions(open, [{ ...base, type: "escalate", subject: "zone:z:heat", level: "act_now", message: "b" }], 2000);
    expect(open).toEqual([expect.objectContaining({ level: "act_now", raisedAt: 1000, message: "b" })]);
    open = applyTransitions(open, [{ ...base, type: "settle", subject: "zone:z:heat", level: "act_now", message: "c" }], 3000);
    expect(open).toEqual([]);
  });
});

describe("where the lines come from", () => {
  it("every species says in plain words which source each band follows, and names the disagreements it settled", () => {
    for (const id of SPECIES_IDS) {
      const lines = BAND_SOURCES[id];
      expect(lines.length, id).toBeGreaterThan(1);
      // each line names a source (an author, an institution) or says it is a keepers' value
      for (const l of lines) expect(l, id).toMatch(/\(|Extension|and others|Reinecke|Edwards|keepers' value|study/);
    }
    // issue 11: E. fetida's wet side follows the three sources above 85 %; P. excavatus follows Edwards et al. 1998
    expect(BAND_SOURCES["eisenia-fetida"].join(" ")).toMatch(/Loehr.*84–91 %.*van Gestel/s);
    expect(BAND_SOURCES["perionyx-excavatus"].join(" ")).toContain("Edwards, Domínguez and Neuhauser (1998)");
  });

  it("a feeding is weighed per square metre of the bed it went on: a zone's share when fed to one zone", () => {
    const t = resolveRules(fetida).heat.t;
    const bed = { lengthCm: 300, widthCm: 100, zoneCount: 3 }; // 3 m², 1 m² a zone
    expect(feedingLoad({ at: 0, zoneId: null, totalKg: 6 }, { bed }, t)).toEqual({ kgPerM2: 2, times: 0.5 });
    expect(feedingLoad({ at: 0, zoneId: "z-1", totalKg: 6 }, { bed }, t)).toEqual({ kgPerM2: 6, times: 1.5 });
    // no size: against 2 kg (common practice); no mass: exactly heavy
    expect(feedingLoad({ at: 0, zoneId: null, totalKg: 3 }, {}, t)).toEqual({ kgPerM2: null, times: 1.5 });
    expect(feedingLoad({ at: 0, zoneId: null }, { bed }, t)).toEqual({ kgPerM2: null, times: 1 });
  });
});
