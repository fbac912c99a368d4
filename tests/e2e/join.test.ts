// Joining a farm on a phone (390×844): the owner invites from the team page, the invitation mail
// arrives in the fake mailbox, its link opens the join page, the new keeper makes an account, signs
// in and sees the team read-only; the link then no longer works.
import type pg from "pg";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { appUrl } from "../helpers/app";
import { launchBrowser, PHONE, screenshotPath } from "../helpers/browser";
import { addToFarm, appDb, linkIn, makeFarm, makePerson, uniq, waitForMail, type Person } from "../integration/team/fixtures";

const SLOW = { timeout: 20_000 };
let browser: Browser;
let c: pg.Client;
let farm: string;
let owner: Person;
const invitee = `new-keeper-${uniq()}@example.org`;
let link = "";

async function page(): Promise<Page> {
  return (await browser.newContext(PHONE)).newPage();
}
async function signInAs(p: Page, email: string, password: string) {
  await p.getByLabel("E-mail").fill(email);
  await p.getByLabel("Password").fill(password);
  await p.getByRole("button", { name: "Sign in" }).click();
}

beforeAll(async () => {
  browser = await launchBrowser();
  c = await appDb();
  farm = await makeFarm(c, `Willow Yard ${uniq()}`);
  owner = await makePerson(c, "Orla Byrne");
  const keeper = await makePerson(c, "Tadhg Keeper");
  await addToFarm(c, farm, owner.id, "owner");
  await addToFarm(c, farm, keeper.id, "keeper");
});

afterAll(async () => {
  await browser?.close();
  await c?.end();
});

describe("joining a farm from an invitation, on a phone", () => {
  it("the owner invites a keeper from the team page", async () => {
    const p = await page();
    await p.goto(`${appUrl()}/farms/${farm}/team`);
    await signInAs(p, owner.email, owner.password);
    await p.waitForURL(`**/farms/${farm}/team`, SLOW);
    await expect.poll(() => p.getByRole("heading", { name: "Team", exact: true }).count()).toBe(1);
    await p.getByLabel("E-mail").fill("not an address");
    await p.getByRole("button", { name: "Send invitation" }).click();
    // The browser's own check stops a malformed address before it is sent.
    expect(await p.getByLabel("E-mail").evaluate((el) => (el as HTMLInputElement).validity.valid)).toBe(false);
    await p.getByLabel("E-mail").fill(invitee);
    await p.getByRole("button", { name: "Send invitation" }).click();
    await expect.poll(() => p.getByText(`Invitation sent to ${invitee} as keeper.`).count(), SLOW).toBe(1);
    await expect.poll(() => p.getByRole("button", { name: `Revoke the invitation to ${invitee}` }).count(), SLOW).toBe(1);
    await p.screenshot({ path: screenshotPath("team-owner"), fullPage: true });
    await p.context().close();
    link = linkIn((await waitForMail(invitee))[0]!, "/join/");
  });

  it("the link opens the join page; a blank name is named as the problem", async () => {
    const p = await page();
    await p.goto(`${appUrl()}${link}`);
    await expect.poll(() => p.getByRole("heading", { name: /^Join Willow Yard/ }).count()).toBe(1);
    expect(await p.getByText(`invited ${invitee} as a keeper`).count()).toBe(1);
    await p.screenshot({ path: screenshotPath("join-new-account"), fullPage: true });
    await p.getByLabel("Your name").fill("   ");
    await p.getByLabel("Password").fill("bedding-before-food");
    await p.getByRole("button", { name: "Join the team" }).click();
    await expect.poll(() => p.getByText("Tell the team your name.").count(), SLOW).toBe(1);
    await p.screenshot({ path: screenshotPath("join-field-error"), fullPage: true });

    await p.getByLabel("Your name").fill("Nuala Keeper");
    await p.getByLabel("Password").fill("bedding-before-food");
    await p.getByRole("button", { name: "Join the team" }).click();
    await p.waitForURL(/\/sign-in\?notice=joined/, SLOW);
    await expect.poll(() => p.getByText("Your account is ready and you are on the team.").count(), SLOW).toBe(1);
    await p.screenshot({ path: screenshotPath("join-then-sign-in"), fullPage: true });
    await signInAs(p, invitee, "bedding-before-food");
    await p.waitForURL(`**/farms/${farm}`, SLOW);

    await p.goto(`${appUrl()}/farms/${farm}/team`);
    await expect.poll(() => p.getByText("Nuala Keeper").count(), SLOW).toBe(1);
    expect(await p.getByText(/^Only an owner of Willow Yard/).count()).toBe(1);
    expect(await p.getByRole("button", { name: "Send invitation" }).count()).toBe(0);
    expect(await p.getByRole("button", { name: "Change role" }).count()).toBe(0);
    await p.screenshot({ path: screenshotPath("team-keeper"), fullPage: true });
    await p.context().close();
  });

  it("the used link shows a clear page", async () => {
    const p = await page();
    await p.goto(`${appUrl()}${link}`);
    await expect.poll(() => p.getByRole("heading", { name: "Already used" }).count()).toBe(1);
    await p.screenshot({ path: screenshotPath("join-used"), fullPage: true });
    await p.context().close();
  });
});
