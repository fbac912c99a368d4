// READINGS_RETENTION_MONTHS: unset or empty keeps every month; a whole number of months from 1
// drops older months; anything else stops the ingest service at start with a clear message.
import { describe, expect, it } from "vitest";
import { readingsRetentionMonths } from "@/lib/server/series/maintenance";

describe("the raw readings' retention setting", () => {
  it("keeps every month when unset or empty", () => {
    expect(readingsRetentionMonths(undefined)).toBeNull();
    expect(readingsRetentionMonths("")).toBeNull();
    expect(readingsRetentionMonths("  ")).toBeNull();
  });

  it("takes a whole number of months", () => {
    expect(readingsRetentionMonths("1")).toBe(1);
    expect(readingsRetentionMonths("24")).toBe(24);
  });

  it.each(["0", "-3", "1.5", "twelve", "12 months", "99999"])("refuses %j, naming the setting and what it takes", (v) => {
    expect(() => readingsRetentionMonths(v)).toThrow(/READINGS_RETENTION_MONTHS must be a whole number of months from 1 to 1200/);
  });
});
