// Readings out as SenML JSON (RFC 8428), read back with our own parser and probe names.
import { describe, expect, it } from "vitest";
import { readingsToSenml, senmlUnitOf } from "@/lib/domain/senml-export";
import { parseSenml } from "@/lib/domain/senml";
import { readingFromRecord } from "@/lib/domain/metrics";
import type { Metric } from "@/lib/domain/vocabulary";

const at = (iso: string) => new Date(iso);
const rows: { probeCode: string; metric: Metric; ts: Date; value: number }[] = [
  { probeCode: "p-1", metric: "temperature", ts: at("2026-05-01T10:00:00Z"), value: 21.5 },
  { probeCode: "p-1", metric: "moisture", ts: at("2026-05-01T10:00:00Z"), value: 62 },
  { probeCode: "p-2", metric: "temperature", ts: at("2026-05-01T09:59:00Z"), value: -3.5 },
  { probeCode: "p-2", metric: "signal", ts: at("2026-05-01T10:01:00.500Z"), value: -71 },
  { probeCode: "p-2", metric: "battery-voltage", ts: at("2026-05-01T10:01:00Z"), value: 3.7 },
  { probeCode: "p-2", metric: "battery-level", ts: at("2026-05-01T10:01:00Z"), value: 88 },
  { probeCode: "p-2", metric: "ammonia", ts: at("2026-05-01T10:02:00Z"), value: 12 },
  { probeCode: "p-2", metric: "moisture-raw", ts: at("2026-05-01T10:02:00Z"), value: 512 },
];

describe("SenML export", () => {
  it("reads back through parseSenml and readingFromRecord to the same probes, metrics, times and values", () => {
    const pack = readingsToSenml(rows);
    const parsed = parseSenml(JSON.stringify(pack));
    expect(parsed.ok).toBe(true);
    if (!parsed.ok) return;
    expect(parsed.errors).toEqual([]);
    const back = parsed.records.map((r) => {
      const got = readingFromRecord(r);
      if (!got.ok) throw new Error(got.reason);
      return got.reading;
    });
    expect(back).toHaveLength(rows.length);
    // The parser resolves records in time order (RFC 8428 §4.6); compare both in (time, probe, metric) order.
    const key = (t: number, p: string, m: string) => `${t.toFixed(3).padStart(20)}|${p}|${m}`;
    const expected = [...rows].sort((a, b) =>
      key(a.ts.getTime() / 1000, a.probeCode, a.metric).localeCompare(key(b.ts.getTime() / 1000, b.probeCode, b.metric)),
    );
    back.sort((a, b) => key(a.time, a.probeId, a.metric).localeCompare(key(b.time, b.probeId, b.metric)));
    back.forEach((r, i) => {
      const want = expected[i]!;
      expect(r.probeId).toBe(want.probeCode);
      expect(r.metric).toBe(want.metric);
      expect(r.time * 1000).toBeCloseTo(want.ts.getTime(), 3);
      expect(r.value).toBeCloseTo(want.value, 9);
    });
  });

  it("sets the base name once per probe and the base time once, on the first record (RFC 8428 §4.1, §4.5.3)", () => {
    const pack = readingsToSenml(rows);
    expect(pack.filter((r) => r.bn !== undefined).map((r) => r.bn)).toEqual(["urn:dev:wormward:p-1:", "urn:dev:wormward:p-2:"]);
    expect(pack.filter((r) => r.bt !== undefined)).toHaveLength(1);
    expect(pack[0]!.bt).toBe(Date.parse("2026-05-01T09:59:00Z") / 1000);
    expect(pack[0]).toMatchObject({ n: "temp", u: "Cel", t: 60, v: 21.5 });
  });

  it("uses registered units: Cel, the ratio / for moisture (62 % → 0.62), V, %EL, count; ppm and dBm (RFC 8798)", () => {
    const pack = readingsToSenml(rows);
    expect(pack.find((r) => r.n === "moisture")).toMatchObject({ u: "/", v: 0.62 });
    expect(senmlUnitOf("temperature")).toBe("Cel");
    expect(senmlUnitOf("battery-voltage")).toBe("V");
    expect(senmlUnitOf("battery-level")).toBe("%EL");
    expect(senmlUnitOf("moisture-raw")).toBe("count");
    expect(senmlUnitOf("ammonia")).toBe("ppm");
    expect(senmlUnitOf("signal")).toBe("dBm");
  });

  it("gives no records for no readings: a pack needs one (RFC 8428 §11), so the export refuses an empty range", () => {
    expect(readingsToSenml([])).toEqual([]);
    expect(parseSenml("[]").ok).toBe(false);
  });
});
