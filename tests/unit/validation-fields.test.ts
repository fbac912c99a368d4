// The building blocks of every input schema (lib/domain/validation/fields.ts): what each refuses, in whose words.
import { describe, expect, it } from "vitest";
import {
  EARLIEST_MS,
  FUTURE_SLACK_MS,
  instant,
  loggedAt,
  longText,
  measured,
  percent,
  plainText,
  quantity,
  timeZone,
  usableTimeZone,
} from "@/lib/domain/validation/fields";
import { farmCreate, farmUpdate } from "@/lib/domain/validation/farm";
import { harvestCreate, harvestCreateFor, sampleCreateFor, wateringCreateFor } from "@/lib/domain/validation/log-entries";
import { feedingCreateFor } from "@/lib/domain/validation/logbook";
import { lbToKg } from "@/lib/domain/units";
import { meUpdate } from "@/lib/domain/validation/alerts";

const issue = (r: { success: boolean; error?: { issues: { message: string }[] } }) => (r.success ? null : r.error!.issues[0]!.message);

describe("plain text", () => {
  const name = plainText("The name", { min: 1, max: 80 });
  it("refuses U+0000 and every other control character, naming it", () => {
    expect(issue(name.safeParse("Bin\u0000A"))).toBe("The name has a control character (U+0000) in it; type it again without it.");
    for (const ch of ["\u0001", "\u001b", "\u007f", "\u0085", "\n", "\t"]) expect(name.safeParse(`a${ch}b`).success, JSON.stringify(ch)).toBe(false);
  });
  it("refuses a lone surrogate, which would be stored as U+FFFD", () => {
    expect(name.safeParse("a\ud800b").success).toBe(false);
  });
  it("keeps letters of any script and emoji, trimmed", () => {
    expect(name.parse("  Wurmkiste Nord 🪱  ")).toBe("Wurmkiste Nord 🪱");
  });
  it("notes may run over lines and hold tabs, but not U+0000", () => {
    const notes = longText("Notes", { max: 2000 });
    expect(notes.parse("turned\r\nthe\tcuring end")).toBe("turned\r\nthe\tcuring end");
    expect(notes.safeParse("turned\u0000").success).toBe(false);
  });
});

describe("measured amounts", () => {
  const mass = quantity("Mass", "kg", { min: 0.001, max: 10_000, minWords: "1 g" });
  it("5e-324, the smallest double, is too small to be a mass", () => {
    expect(issue(mass.safeParse(5e-324))).toBe("Mass is too small to be measured; the smallest is 1 g.");
  });
  it("values a PostgreSQL real cannot hold are refused: subnormal float4 and beyond its range", () => {
    expect(mass.safeParse(1e-40).success).toBe(false);
    expect(mass.safeParse(1e39).success).toBe(false);
  });
  it("zero and negatives are 'more than 0' where zero is not a mass, and 'not negative' where it is", () => {
    expect(issue(mass.safeParse(0))).toBe("Mass must be more than 0.");
    expect(issue(mass.safeParse(-2))).toBe("Mass must be more than 0.");
    const tare = quantity("Container mass", "g", { min: 0.001, max: 100_000, zero: true });
    expect(tare.parse(0)).toBe(0);
    expect(issue(tare.safeParse(-1))).toBe("Container mass cannot be negative.");
    expect(tare.safeParse(1e-9).success).toBe(false);
  });
  it("a mass, volume or length is refused in the farm's units, with the same limits in kg, L and cm", () => {
    const metric = measured("Mass", "mass", "metric", { min: 0.001, max: 10_000, minWords: "1 g" });
    const imperial = measured("Mass", "mass", "imperial", { min: 0.001, max: 10_000, minWords: "1 g" });
    expect(issue(metric.safeParse(10_001))).toBe("Mass cannot be over 10000 kg.");
    // 10 000 kg is 22 046.2 lb: said rounded down, so the number said is itself accepted
    expect(issue(imperial.safeParse(10_001))).toBe("Mass cannot be over 22000 lb.");
    expect(imperial.safeParse(lbToKg(22_000)).success).toBe(true);
    expect(issue(metric.safeParse(0.0005))).toBe("Mass is too small to be measured; the smallest is 1 g.");
    // 1 g is 0.0022046 lb: said rounded up
    expect(issue(imperial.safeParse(0.0005))).toBe("Mass is too small to be measured; the smallest is 0.00221 lb.");
    expect(issue(imperial.safeParse(0))).toBe("Mass must be more than 0.");
    const water = measured("Water", "volume", "imperial", { min: 0.01, max: 10_000 });
    expect(issue(water.safeParse(10_001))).toBe("Water cannot be over 2640 US gal.");
    expect(issue(measured("Size", "length", "imperial", { min: 1, max: 100_000 }).safeParse(100_001))).toBe("Size cannot be over 39300 in.");
  });
  it("the logbook's schemas refuse in the farm's units: no kg or L on an imperial farm, no lb or gal on a metric one", () => {
    const big = { massKg: 1e6, litres: 1e6 };
    const imperial = [harvestCreateFor("imperial").safeParse(big), wateringCreateFor("imperial").safeParse(big)].map(issue);
    expect(imperial).toEqual(["Mass cannot be over 220000 lb.", "Water cannot be over 2640 US gal."]);
    const feeding = feedingCreateFor("imperial").safeParse({ items: [{ name: "Straw", massKg: 20_000, moisturePct: 10, nitrogenPct: 0.7, cn: 80 }] });
    expect(issue(feeding)).toBe("Mass cannot be over 22000 lb.");
    const metric = [harvestCreateFor("metric").safeParse(big), wateringCreateFor("metric").safeParse(big)].map(issue);
    expect(metric).toEqual(["Mass cannot be over 100000 kg.", "Water cannot be over 10000 L."]);
    expect(harvestCreate).toBe(harvestCreateFor("metric"));
  });
  it("an oven-dry sample's oven limits are said in °F on an imperial farm and °C on a metric one; the check is the same", () => {
    const hot = { wetMassG: 10, dryMassG: 3, ovenTempC: 150 };
    expect(issue(sampleCreateFor("imperial").safeParse(hot))).toBe("Oven temperature above 266 °F burns organic matter.");
    expect(issue(sampleCreateFor("metric").safeParse(hot))).toBe("Oven temperature above 130 °C burns organic matter.");
    expect(issue(sampleCreateFor("imperial").safeParse({ ...hot, ovenTempC: 30 }))).toBe("Oven temperature below 104 °F will not dry the sample.");
  });
  it("NaN, Infinity and numbers sent as text are not amounts", () => {
    for (const v of [Number.NaN, Number.POSITIVE_INFINITY, "3"]) expect(mass.safeParse(v).success, String(v)).toBe(false);
  });
  it("percentages are 0–100 and a positive one refuses 0", () => {
    expect(percent("Moisture").parse(0)).toBe(0);
    expect(percent("Moisture").safeParse(100.5).success).toBe(false);
    expect(percent("Nitrogen", { positive: true }).safeParse(0).success).toBe(false);
    expect(percent("Nitrogen", { positive: true }).safeParse(5e-324).success).toBe(false);
  });
});

describe("times", () => {
  it("0001-01-01 is refused: stored, PostgreSQL writes it as '0001-…', which Date reads back as 2001", () => {
    expect(new Date("0001-01-01 00:00:00+00").getUTCFullYear()).toBe(2001);
    expect(issue(loggedAt.safeParse("0001-01-01T00:00:00Z"))).toMatch(/before 2000/);
  });
  it("2100 is the future; a few minutes of phone clock drift are not", () => {
    expect(issue(loggedAt.safeParse("2100-01-01T00:00:00Z"))).toMatch(/future/);
    expect(loggedAt.safeParse(new Date(Date.now() + FUTURE_SLACK_MS / 2).toISOString()).success).toBe(true);
    expect(loggedAt.safeParse(new Date(Date.now() + FUTURE_SLACK_MS * 2).toISOString()).success).toBe(false);
  });
  it("needs a zone and a real calendar day; a bare number or year is not a time", () => {
    for (const v of ["2025-05-01", "2025-05-01T10:00:00", "2025-02-30T10:00:00Z", "2025-05-01T24:00:00Z", "1", "2100", 1_700_000_000_000]) {
      expect(loggedAt.safeParse(v).success, String(v)).toBe(false);
    }
    expect(loggedAt.parse("2025-05-01T10:00:00+02:00").toISOString()).toBe("2025-05-01T08:00:00.000Z");
    expect(loggedAt.parse("2024-02-29 06:15:00Z").toISOString()).toBe("2024-02-29T06:15:00.000Z");
  });
  it("a year beyond PostgreSQL's range (or JavaScript's) is refused", () => {
    expect(instant("since").safeParse("+275760-09-13T00:00:00Z").success).toBe(false);
    expect(instant("since").parse(new Date(EARLIEST_MS).toISOString()).getTime()).toBe(EARLIEST_MS);
  });
});

describe("time zones", () => {
  it("every zone Intl lists is usable by the app's clock code", () => {
    const unusable = Intl.supportedValuesOf("timeZone").filter((z) => !usableTimeZone(z));
    expect(unusable).toEqual([]);
  });
  it("links Intl accepts are kept; unknown names, offsets and control characters are refused", () => {
    for (const tz of ["UTC", "US/Pacific", "Asia/Calcutta", "Etc/GMT-14"]) expect(timeZone.safeParse(tz).success, tz).toBe(true);
    for (const tz of ["Mars/Olympus_Mons", "Etc/GMT+14", "+05:30", "Europe/Dublin\u0000", "", "Europe/Dublin; drop"])
      expect(timeZone.safeParse(tz).success, tz).toBe(false);
  });
  it("a listed zone in other letter case is stored as Intl spells it", () => {
    expect(timeZone.parse("europe/dublin")).toBe("Europe/Dublin");
    expect(timeZone.parse("utc")).toBe("UTC");
  });
});

describe("a PATCH names only what changes", () => {
  it("a farm update with only a name has no time zone or units to write", () => {
    expect(farmUpdate.parse({ name: "x" })).toEqual({ name: "x" });
    expect(farmCreate.parse({ name: "x" })).toEqual({ name: "x", unitSystem: "metric", timezone: "UTC" });
  });
  it("a person's update with one end of quiet hours is left to the stored other end", () => {
    expect(meUpdate.parse({ quietFrom: "23:00" })).toEqual({ quietFrom: "23:00" });
    expect(meUpdate.safeParse({ quietFrom: "23:00", quietTo: null }).success).toBe(false);
  });
});
