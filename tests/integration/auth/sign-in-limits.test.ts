// Guessing passwords against the running app: limits per account and per client address, held in
// PostgreSQL, the same answer for an unknown e-mail, and the try-again wording. Each test names
// its own made-up client address (RFC 5737 documentation range), which the app reads from
// X-Forwarded-For because the harness starts it behind one trusted proxy hop.
import bcrypt from "bcryptjs";
import type pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { trySignIn } from "../../helpers/app";
import { appDb, makePerson, uniq } from "../team/fixtures";
import { BCRYPT_COST } from "@/lib/server/auth/password";

const TRY_AGAIN = /^Too many tries\. Try again in 1[45] minutes\.$/;
let c: pg.Client;
const people: string[] = [];
const addresses: string[] = [];
const accounts: string[] = [];

async function person(name: string) {
  const p = await makePerson(c, name);
  people.push(p.id);
  accounts.push(p.email);
  return p;
}

function address(last: number) {
  const a = `198.51.100.${last}`;
  addresses.push(a);
  return a;
}

const failuresOf = async (key: string) => (await c.query(`select count(*)::int as n from sign_in_failures where key = $1`, [key])).rows[0].n as number;

beforeAll(async () => {
  c = await appDb();
});
afterAll(async () => {
  await c.query(`delete from sign_in_failures where key = any($1)`, [
    [...addresses.map((a) => `address:${a}`), ...accounts.map((e) => `account:${e.toLowerCase()}`)],
  ]);
  if (people.length) await c.query(`delete from users where id = any($1)`, [people]);
  await c?.end();
});

describe("sign-in resists guessing", () => {
  it("the 6th wrong password in a minute is refused for that account", async () => {
    const fern = await person("Guessed Fern");
    const other = await person("Untouched Oak");
    const from = address(7);
    for (let i = 1; i <= 5; i++) {
      const a = await trySignIn(fern.email, `wrong-guess-${i}`, from);
      expect(a.status, `try ${i}`).toBe(401);
      expect(a.error, `try ${i}`).toBe("CredentialsSignin");
    }
    const sixth = await trySignIn(fern.email, "wrong-guess-6", from);
    expect(sixth.status).toBe(401);
    expect(sixth.error).toMatch(TRY_AGAIN);
    // The right password is refused too while the limit holds, and gives no session.
    const right = await trySignIn(fern.email, fern.password, from);
    expect(right.error).toMatch(TRY_AGAIN);
    expect(right.session).toBeNull();
    // From another address as well: the limit is the account's.
    expect((await trySignIn(fern.email, fern.password, address(8))).error).toMatch(TRY_AGAIN);
    // Refused tries are not counted: the lock ends 15 minutes after the first failure, not later.
    expect(await failuresOf(`account:${fern.email}`)).toBe(5);
    // Another account from the same address is unaffected.
    const ok = await trySignIn(other.email, other.password, from);
    expect(ok.session).not.toBeNull();
    expect((await ok.session!.fetch("/api/me")).status).toBe(200);
    // Once the window has passed (the failures moved 15 minutes into the past), the right password works.
    await c.query(`update sign_in_failures set at = at - interval '15 minutes' where key = $1`, [`account:${fern.email}`]);
    const later = await trySignIn(fern.email, fern.password, from);
    expect(later.session).not.toBeNull();
    // A success starts the account afresh.
    expect(await failuresOf(`account:${fern.email}`)).toBe(0);
  });

  it("ten wrong passwords at once for one account: five are checked, five refused", async () => {
    const birch = await person("Rushed Birch");
    const from = address(9);
    const all = await Promise.all(Array.from({ length: 10 }, (_, i) => trySignIn(birch.email, `burst-${i}`, from)));
    const errors = all.map((a) => a.error);
    expect(errors.filter((e) => e === "CredentialsSignin")).toHaveLength(5);
    expect(errors.filter((e) => e !== null && TRY_AGAIN.test(e))).toHaveLength(5);
    expect((await trySignIn(birch.email, birch.password, from)).error).toMatch(TRY_AGAIN);
  });

  it("wrong passwords from one address are limited across accounts", async () => {
    const from = address(23);
    const victim = await person("Sprayed Elm");
    // One guess each at 25 e-mails (unknown ones, as a list-walker's mostly are), all at once.
    const emails = Array.from({ length: 25 }, (_, i) => `walk-${i}-${uniq()}@example.org`);
    accounts.push(...emails);
    const all = await Promise.all(emails.map((e) => trySignIn(e, "Summer2026!", from)));
    const errors = all.map((a) => a.error);
    // Counted together, so a failure shows every answer that was neither (a timeout under load, say).
    const answers = {
      checked: errors.filter((e) => e === "CredentialsSignin").length,
      refused: errors.filter((e) => e !== null && TRY_AGAIN.test(e)).length,
      other: errors.filter((e) => e !== "CredentialsSignin" && !(e !== null && TRY_AGAIN.test(e))),
    };
    expect(answers).toEqual({ checked: 20, refused: 5, other: [] });
    expect(await failuresOf(`address:${from}`)).toBe(20);
    // The address is held back even with a right password for an account it never tried...
    expect((await trySignIn(victim.email, victim.password, from)).error).toMatch(TRY_AGAIN);
    // ...while the same person signs in from their own address.
    expect((await trySignIn(victim.email, victim.password, address(24))).session).not.toBeNull();
  });

  it("an unknown e-mail gets the same answer as a wrong password", async () => {
    const larch = await person("Known Larch");
    const from = address(41);
    const nobody = `nobody-${uniq()}@example.org`;
    accounts.push(nobody);
    const known = await trySignIn(larch.email, "not-her-password", from);
    const unknown = await trySignIn(nobody, "not-her-password", from);
    expect(unknown.status).toBe(known.status);
    expect(unknown.body).toBe(known.body);
    expect(unknown.error).toBe("CredentialsSignin");
    // Both answers wait for a bcrypt compare at our cost (a dummy hash stands in for the missing
    // account); without it the unknown e-mail would answer in a few milliseconds. A loose floor:
    // a third of one compare measured here.
    const hash = await bcrypt.hash("x", BCRYPT_COST);
    let compare = Infinity;
    for (let i = 0; i < 2; i++) {
      const t = performance.now();
      await bcrypt.compare("y", hash);
      compare = Math.min(compare, performance.now() - t);
    }
    expect(known.ms).toBeGreaterThan(compare / 3);
    expect(unknown.ms).toBeGreaterThan(compare / 3);
    // And the unknown e-mail is limited like an account: five tries, then the same refusal.
    for (let i = 0; i < 4; i++) await trySignIn(nobody, `guess-${i}`, from);
    expect((await trySignIn(nobody, "guess-5", from)).error).toMatch(TRY_AGAIN);
  });

  it("a client address written by the client itself is not trusted past the proxy's entry", async () => {
    // Behind one proxy, only the last entry (the one the proxy appended) names the client; what the
    // client put before it is ignored, so rotating it does not escape the address limit.
    const from = address(57);
    const oak = await person("Rotating Oak");
    const emails = Array.from({ length: 20 }, (_, i) => `rot-${i}-${uniq()}@example.org`);
    accounts.push(...emails);
    const all = await Promise.all(emails.map((e, i) => trySignIn(e, "guess", `203.0.113.${i}, ${from}`)));
    expect(all.map((a) => a.error)).toEqual(emails.map(() => "CredentialsSignin"));
    expect((await trySignIn(oak.email, oak.password, `203.0.113.99, ${from}`)).error).toMatch(TRY_AGAIN);
  });
});
