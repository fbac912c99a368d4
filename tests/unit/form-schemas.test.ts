// A form and its route handler parse one input with one schema (lib/domain/validation): the settings
// form is PATCH /api/farms/[farmId]'s schema with every field posted, the "You" form PATCH /api/me's
// with an empty time read as "no quiet hours". Whatever one door refuses, the other refuses alike.
import { describe, expect, it } from "vitest";
import { farmForm, farmUpdate } from "@/lib/domain/validation/farm";
import { meForm, meUpdate } from "@/lib/domain/validation/alerts";

const FARM = "7d3f2c1a-4b5e-4f60-8a9b-0c1d2e3f4a5b";
const said = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) =>
  r.success ? null : { field: r.error!.issues[0]!.path.join("."), message: r.error!.issues[0]!.message };

describe("the settings form and PATCH /api/farms/[farmId]", () => {
  const form = { farmId: FARM, name: "Alder Row", unitSystem: "imperial", timezone: "Europe/Dublin" };
  it("an unknown or unusable time zone is refused by both, in the same words", () => {
    for (const timezone of ["Mars/Olympus", "Europe/Dublin\u0000", "", "x".repeat(65)]) {
      expect(said(farmForm.safeParse({ ...form, timezone })), timezone).toEqual(said(farmUpdate.safeParse({ timezone })));
      expect(said(farmForm.safeParse({ ...form, timezone }))?.field).toBe("timezone");
    }
  });
  it("both store a zone as Intl spells it", () => {
    expect(farmForm.parse({ ...form, timezone: "europe/dublin" }).timezone).toBe(farmUpdate.parse({ timezone: "europe/dublin" }).timezone);
  });
  it("the form must post every field; the API changes only what it names", () => {
    expect(farmForm.safeParse({ farmId: FARM, name: "Alder Row" }).success).toBe(false);
    expect(farmUpdate.parse({ name: "Alder Row" })).toEqual({ name: "Alder Row" });
  });
});

describe('the "You" form and PATCH /api/me', () => {
  it("an empty time on the form is null in the API's terms", () => {
    expect(meForm.parse({ quietFrom: "", quietTo: "", timezone: "Europe/Lisbon" })).toEqual({ quietFrom: null, quietTo: null, timezone: "Europe/Lisbon" });
    expect(meForm.parse({ quietFrom: "22:00", quietTo: "06:30", timezone: "UTC" })).toEqual(
      meUpdate.parse({ quietFrom: "22:00", quietTo: "06:30", timezone: "UTC" }),
    );
  });
  it("one end of quiet hours without the other, a bad time or a bad zone is refused by both alike", () => {
    const cases = [
      [
        { quietFrom: "22:00", quietTo: "" },
        { quietFrom: "22:00", quietTo: null },
      ],
      [
        { quietFrom: "25:00", quietTo: "06:00" },
        { quietFrom: "25:00", quietTo: "06:00" },
      ],
      [{ quietFrom: "", quietTo: "", timezone: "Mars/Olympus" }, { timezone: "Mars/Olympus" }],
    ] as const;
    for (const [form, api] of cases) {
      const viaForm = said(meForm.safeParse({ timezone: "UTC", ...form }));
      expect(viaForm, JSON.stringify(form)).not.toBeNull();
      expect(viaForm).toEqual(said(meUpdate.safeParse(api)));
    }
  });
});
