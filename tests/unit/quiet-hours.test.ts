import { describe, expect, it } from "vitest";
import { inQuietHours } from "@/lib/domain/quiet-hours";

const at = (iso: string) => new Date(iso);

describe("quiet hours", () => {
  it("a span across midnight holds from its start to just before its end", () => {
    expect(inQuietHours(at("2026-12-01T21:59:00Z"), "22:00", "06:30", "UTC")).toBe(false);
    expect(inQuietHours(at("2026-12-01T22:00:00Z"), "22:00", "06:30", "UTC")).toBe(true);
    expect(inQuietHours(at("2026-12-02T03:00:00Z"), "22:00", "06:30", "UTC")).toBe(true);
    expect(inQuietHours(at("2026-12-02T06:29:00Z"), "22:00", "06:30", "UTC")).toBe(true);
    expect(inQuietHours(at("2026-12-02T06:30:00Z"), "22:00", "06:30", "UTC")).toBe(false);
  });

  it("a daytime span holds only inside it", () => {
    expect(inQuietHours(at("2026-12-01T12:00:00Z"), "11:00", "14:00", "UTC")).toBe(true);
    expect(inQuietHours(at("2026-12-01T14:00:00Z"), "11:00", "14:00", "UTC")).toBe(false);
  });

  it("reads the clock in the person's timezone", () => {
    // 21:30 UTC is 07:30 the next morning in Melbourne (UTC+11 in December, daylight time).
    expect(inQuietHours(at("2026-12-01T21:30:00Z"), "22:00", "07:00", "Australia/Melbourne")).toBe(false);
    expect(inQuietHours(at("2026-12-01T19:30:00Z"), "22:00", "07:00", "Australia/Melbourne")).toBe(true);
  });

  it("no quiet hours, or an empty span, hold nothing back", () => {
    expect(inQuietHours(at("2026-12-01T03:00:00Z"), null, null, "UTC")).toBe(false);
    expect(inQuietHours(at("2026-12-01T03:00:00Z"), "05:00", "05:00", "UTC")).toBe(false);
  });
});
