// Owner screens at phone size (390×844): a bin's alert rules (change a line, a refused value shown
// beside its field, back to the species defaults), the farm's units switched to imperial and back,
// archiving a bin with a confirm step and bringing it back; a keeper reads the rules and has no Settings.
import type pg from "pg";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { formatTemperature } from "@/lib/domain/units";
import { appUrl, signIn, type Session } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { addToFarm, appDb, makeFarm, makePerson, uniq, type Person } from "../integration/team/fixtures";

type Rules = {
  defaults: { kind: string; params: { key: string; value: number }[] }[];
  overrides: Record<string, { enabled?: boolean; thresholds?: Record<string, number> } | undefined>;
  effective: Record<string, { enabled: boolean; t: Record<string, number> }>;
};

const SLOW = { timeout: 20_000 };
const PASSWORD = "alder-row-demo";
let browser: Browser;
let c: pg.Client;
let farmId: string;
let bin: { id: string; name: string };
let owner: Session;
let startUnits: string;

async function signedIn(email: string, password = PASSWORD): Promise<Page> {
  const p = await (await browser.newContext(PHONE)).newPage();
  await p.goto(`${appUrl()}/sign-in`);
  await p.getByLabel("E-mail").fill(email);
  await p.getByLabel("Password").fill(password);
  await p.getByRole("button", { name: "Sign in" }).click();
  await p.waitForURL(/\/farms\//, SLOW);
  return p;
}
const rules = async (): Promise<Rules> => (await owner.fetch(`/api/bins/${bin.id}/rules`)).json() as Promise<Rules>;
const heatDefault = (r: Rules, key: string) => r.defaults.find((d) => d.kind === "heat")!.params.find((p) => p.key === key)!.value;

beforeAll(async () => {
  browser = await launchBrowser();
  c = await appDb();
  // The demo farm by name and id: other tests give the demo owner more farms.
  const f = await c.query(`select id, unit_system from farms where name = 'Alder Row Worm Farm' order by created_at limit 1`);
  farmId = f.rows[0].id;
  startUnits = f.rows[0].unit_system;
  const b = await c.query(`select id, name from bins where farm_id = $1 and name = 'Long Bed North'`, [farmId]);
  bin = b.rows[0];
  owner = await signIn("noor@alder-row.example", PASSWORD);
});

afterAll(async () => {
  // Leave the demo farm as found even when a step failed half-way.
  await c?.query(`delete from rules where bin_id = $1 and kind = 'heat'`, [bin?.id]).catch(() => {});
  if (startUnits) await c?.query(`update farms set unit_system = $2 where id = $1`, [farmId, startUnits]).catch(() => {});
  await browser?.close();
  await c?.end();
});

describe("alert rules of a bin, on a phone", () => {
  it("the owner changes the heat heads-up line, saves, reloads and sees it; the API applies it", async () => {
    const before = await rules();
    expect(before.overrides.heat).toBeUndefined();
    const p = await signedIn("noor@alder-row.example");
    await p.goto(`${appUrl()}/farms/${farmId}/bins/${bin.id}`);
    await p.getByRole("link", { name: "Alert rules" }).click();
    await p.waitForURL(`**/bins/${bin.id}/rules`, SLOW);
    const heat = p.getByRole("region", { name: "Heat", exact: true });
    const line = heat.getByLabel("Heads-up above", { exact: true });
    expect(await line.inputValue()).toBe("");
    expect(await line.getAttribute("placeholder")).toBe(String(heatDefault(before, "headsUpAboveC")));
    // What the rule does comes first, in words; where each number comes from is folded away.
    expect(await heat.getByText(/^Tells the crew when the bed stays above \d+(\.\d)? °C for 10 min/).isVisible()).toBe(true);
    expect(await heat.getByText("From the worm species: top of the comfortable band.").isVisible()).toBe(false);
    await heat.getByText("Where this comes from").click();
    expect(await heat.getByText("From the worm species: top of the comfortable band.").isVisible()).toBe(true);
    await line.fill("27.5");
    await heat.getByRole("button", { name: "Save heat rule" }).click();
    await expect.poll(() => heat.getByText("Saved for this bin.").count(), SLOW).toBe(1);

    await p.reload();
    const again = p.getByRole("region", { name: "Heat", exact: true });
    expect(await again.getByLabel("Heads-up above", { exact: true }).inputValue()).toBe("27.5");
    expect(await again.getByText("This bin has its own values.").count()).toBe(1);
    await again.evaluate((el) => el.scrollIntoView());
    await p.screenshot({ path: screenshotPath("rules-owner-saved"), fullPage: false });

    const after = await rules();
    expect(after.effective.heat!.t.headsUpAboveC).toBe(27.5);
    expect(after.effective.heat!.t.actNowAtC).toBe(heatDefault(after, "actNowAtC"));
    expect(after.effective.chill).toEqual(before.effective.chill);
    await p.context().close();
  });

  it("negative minutes are refused beside the field, and nothing stored is lost", async () => {
    const p = await signedIn("noor@alder-row.example");
    await p.goto(`${appUrl()}/farms/${farmId}/bins/${bin.id}/rules`);
    const heat = p.getByRole("region", { name: "Heat", exact: true });
    const minutes = heat.getByLabel("Held this long before raising", { exact: true });
    await minutes.fill("-5");
    await heat.getByRole("button", { name: "Save heat rule" }).click();
    const err = p.locator(`#rule-heat-raiseMinutes-err`);
    await expect.poll(() => err.count(), SLOW).toBe(1);
    expect(await err.textContent()).toContain("Held this long before raising cannot be negative.");
    expect(await minutes.getAttribute("aria-invalid")).toBe("true");
    // beside the field: directly under its input, not in a banner elsewhere
    const box = (await minutes.boundingBox())!;
    const errBox = (await err.boundingBox())!;
    expect(errBox.y - (box.y + box.height)).toBeGreaterThanOrEqual(0);
    expect(errBox.y - (box.y + box.height)).toBeLessThan(24);
    await err.scrollIntoViewIfNeeded();
    await p.screenshot({ path: screenshotPath("rules-owner-field-error") });

    const r = await rules();
    expect(r.effective.heat!.t.raiseMinutes).toBe(heatDefault(r, "raiseMinutes"));
    expect(r.effective.heat!.t.headsUpAboveC).toBe(27.5);
    await p.context().close();
  });

  it("back to defaults restores the species' numbers", async () => {
    const p = await signedIn("noor@alder-row.example");
    await p.goto(`${appUrl()}/farms/${farmId}/bins/${bin.id}/rules`);
    const heat = p.getByRole("region", { name: "Heat", exact: true });
    await heat.getByRole("button", { name: "Back to defaults" }).click();
    await expect.poll(() => heat.getByText("Back to the species defaults.").count(), SLOW).toBe(1);
    expect(await heat.getByLabel("Heads-up above", { exact: true }).inputValue()).toBe("");
    expect(await heat.getByText("Uses the species defaults.").count()).toBe(1);
    const r = await rules();
    expect(r.overrides.heat).toBeUndefined();
    expect(r.effective.heat!.t.headsUpAboveC).toBe(heatDefault(r, "headsUpAboveC"));
    await p.context().close();
  });
});

describe("farm settings, on a phone", () => {
  it("the owner switches the farm to imperial and Today shows °F, then back to metric", async () => {
    // A farm of its own: other browser tests read the demo farm in metric at the same time.
    const own = await makeFarm(c, `Units farm ${uniq()}`);
    const person: Person = await makePerson(c, "Units Owner");
    await addToFarm(c, own, person.id, "owner");
    const s = await signIn(person.email, person.password);
    const made = (await (
      await s.fetch(`/api/farms/${own}/bins`, { method: "POST", json: { name: "Cellar Tote", style: "tote", species: "eisenia-fetida", zoneCount: 1 } })
    ).json()) as { bin: { zones: { id: string }[] } };
    const probe = await c.query(`insert into probes (farm_id, zone_id, code, token_hash) values ($1, $2, $3, 'x') returning id`, [
      own,
      made.bin.zones[0]!.id,
      `units-${uniq()}`,
    ]);
    const c0 = 21.3;
    await c.query(`insert into readings (probe_id, metric, ts, value) values ($1, 'temperature', now(), $2)`, [probe.rows[0].id, c0]);
    const p = await signedIn(person.email, person.password);
    await p.goto(`${appUrl()}/farms/${own}`);
    await p.getByRole("navigation", { name: "Farm" }).getByRole("link", { name: "Settings" }).click();
    await p.waitForURL(`**/farms/${own}/settings`, SLOW);
    await p.getByRole("button", { name: "Imperial (°F, lb, US gal)" }).click();
    await p.getByRole("button", { name: "Save farm settings" }).click();
    await expect.poll(() => p.getByText(/Saved\. Temperatures in °F/).count(), SLOW).toBe(1);
    await p.screenshot({ path: screenshotPath("settings-owner-imperial"), fullPage: true });

    await p.goto(`${appUrl()}/farms/${own}`);
    // visible, not merely streamed into a hidden holder behind the loading screen
    await p
      .getByText(formatTemperature(c0, "imperial"))
      .first()
      .waitFor({ state: "visible", ...SLOW });
    expect(await p.getByText(/°C/).count()).toBe(0);
    await p.screenshot({ path: screenshotPath("today-imperial") });

    // The probe's calibration page: the oven in °F, 70 °C said as 158 °F, and the food-oven caution.
    await p.goto(`${appUrl()}/farms/${own}/probes/${probe.rows[0].id}`);
    const oven = p.getByLabel("Oven (°F)");
    await oven.waitFor(SLOW);
    expect(await oven.inputValue()).toBe("158");
    expect(await p.getByText("Use an oven that is not used for food.", { exact: false }).count()).toBe(1);
    expect(await p.getByText(/°C/).count()).toBe(0);

    await p.goto(`${appUrl()}/farms/${own}/settings`);
    await p.getByRole("button", { name: "Metric (°C, kg, L)" }).click();
    await p.getByRole("button", { name: "Save farm settings" }).click();
    await expect.poll(() => p.getByText(/Saved\. Temperatures in °C/).count(), SLOW).toBe(1);
    await p.goto(`${appUrl()}/farms/${own}`);
    await p
      .getByText(formatTemperature(c0, "metric"))
      .first()
      .waitFor({ state: "visible", ...SLOW });
    expect(await p.getByText(/°F/).count()).toBe(0);
    const f = await c.query(`select unit_system from farms where id = $1`, [own]);
    expect(f.rows[0].unit_system).toBe("metric");
    await p.context().close();
  });

  it("an unknown timezone is refused beside its field", async () => {
    const p = await signedIn("noor@alder-row.example");
    await p.goto(`${appUrl()}/farms/${farmId}/settings`);
    await p.getByLabel("Time zone").fill("Europe/Atlantis");
    await p.getByRole("button", { name: "Save farm settings" }).click();
    await expect.poll(() => p.getByText("Unknown time zone; use a name such as Europe/Dublin or UTC.").count(), SLOW).toBe(1);
    const f = await c.query(`select timezone from farms where id = $1`, [farmId]);
    expect(f.rows[0].timezone).toBe("Europe/Dublin");
    await p.context().close();
  });

  it("an owner archives a bin after confirming and brings it back", async () => {
    // A farm of its own, so Today on the demo farm never loses a bin while other tests read it.
    const own = await makeFarm(c, `Settings farm ${uniq()}`);
    const person: Person = await makePerson(c, "Settings Owner");
    await addToFarm(c, own, person.id, "owner");
    const s = await signIn(person.email, person.password);
    const made = await s.fetch(`/api/farms/${own}/bins`, {
      method: "POST",
      json: { name: "Porch Tote", style: "tote", species: "eisenia-fetida", zoneCount: 1 },
    });
    expect(made.status).toBe(201);

    const p = await signedIn(person.email, person.password);
    await p.goto(`${appUrl()}/farms/${own}/settings`);
    await p.getByRole("button", { name: "Archive Porch Tote" }).click();
    await p.screenshot({ path: screenshotPath("settings-archive-confirm"), fullPage: true });
    await p.getByRole("button", { name: "Keep it" }).click();
    expect(await c.query(`select archived_at from bins where farm_id = $1`, [own]).then((r) => r.rows[0].archived_at)).toBeNull();
    await p.getByRole("button", { name: "Archive Porch Tote" }).click();
    await p.getByRole("button", { name: "Yes, archive" }).click();
    await expect.poll(() => p.getByRole("button", { name: "Bring back Porch Tote" }).count(), SLOW).toBe(1);
    expect(await c.query(`select archived_at from bins where farm_id = $1`, [own]).then((r) => r.rows[0].archived_at)).not.toBeNull();
    await p.screenshot({ path: screenshotPath("settings-archived"), fullPage: true });

    await p.getByRole("button", { name: "Bring back Porch Tote" }).click();
    await expect.poll(() => p.getByRole("button", { name: "Archive Porch Tote" }).count(), SLOW).toBe(1);
    expect(await c.query(`select archived_at from bins where farm_id = $1`, [own]).then((r) => r.rows[0].archived_at)).toBeNull();
    await p.context().close();
  });

  it("a keeper sees the rules read-only and no Settings link", async () => {
    const p = await signedIn("tomas@alder-row.example");
    await p.goto(`${appUrl()}/farms/${farmId}/bins/${bin.id}/rules`);
    const heat = p.getByRole("region", { name: "Heat", exact: true });
    await expect.poll(() => heat.count(), SLOW).toBe(1);
    expect(await p.getByText("Only an owner of Alder Row Worm Farm can change these rules.").count()).toBe(1);
    expect(await p.locator("main input").count()).toBe(0);
    expect(await p.getByRole("button", { name: "Save heat rule" }).count()).toBe(0);
    expect(await p.getByRole("button", { name: "Back to defaults" }).count()).toBe(0);
    expect(await heat.getByText("This bin:").count()).toBeGreaterThan(5);
    await p.screenshot({ path: screenshotPath("rules-keeper-read-only") });
    const nav = p.getByRole("navigation", { name: "Farm" });
    expect(await nav.getByRole("link", { name: "Team" }).count()).toBe(1);
    expect(await nav.getByRole("link", { name: "Settings" }).count()).toBe(0);
    await p.goto(`${appUrl()}/farms/${farmId}/settings`);
    await expect.poll(() => p.getByText("Only an owner of Alder Row Worm Farm can change its settings.").count(), SLOW).toBe(1);
    expect(await p.getByRole("button", { name: "Save farm settings" }).count()).toBe(0);
    await p.context().close();
  });
});
