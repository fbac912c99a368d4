import { describe, expect, it } from "vitest";
import { toWire } from "@/lib/domain/wire";

// toWire gives what JSON.stringify then JSON.parse would (ECMAScript Date.prototype.toJSON: ISO 8601).
describe("toWire", () => {
  it("turns dates at any depth into the ISO strings the API answers with, and keeps the rest", () => {
    const row = { id: "b1", at: new Date("2026-03-01T06:30:00Z"), items: [{ when: new Date(0), kg: 1.5, note: null }], tags: ["a"] };
    expect(toWire(row)).toEqual({ id: "b1", at: "2026-03-01T06:30:00.000Z", items: [{ when: "1970-01-01T00:00:00.000Z", kg: 1.5, note: null }], tags: ["a"] });
    expect(toWire(row)).toEqual(JSON.parse(JSON.stringify(row)));
  });
});
