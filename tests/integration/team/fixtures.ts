// What the team and password tests share: people and farms in the app's database, and the fake
// mailbox read over its HTTP API.
import { randomBytes } from "node:crypto";
import pg from "pg";
import { inject } from "vitest";
import { hashPassword } from "@/lib/server/auth/password";

export const uniq = () => randomBytes(4).toString("hex");

export async function appDb(): Promise<pg.Client> {
  const c = new pg.Client({ connectionString: inject("appDbUrl") });
  await c.connect();
  return c;
}

export type Person = { id: string; email: string; name: string; password: string };

// One password and hash per test file: bcrypt at cost 12 takes a third of a second a hash.
const password = `pass-${uniq()}-word`;
let passwordHash: Promise<string> | null = null;

export async function makePerson(c: pg.Client, name = "Test person"): Promise<Person> {
  const email = `${name.toLowerCase().replace(/\W+/g, "-")}-${uniq()}@example.org`;
  passwordHash ??= hashPassword(password);
  const u = await c.query(`insert into users (email, name, password_hash) values ($1, $2, $3) returning id`, [email, name, await passwordHash]);
  return { id: u.rows[0].id as string, email, name, password };
}

export async function makeFarm(c: pg.Client, name = `Team farm ${uniq()}`): Promise<string> {
  const f = await c.query(`insert into farms (name, timezone) values ($1, 'Europe/Dublin') returning id`, [name]);
  return f.rows[0].id as string;
}

export async function addToFarm(c: pg.Client, farmId: string, userId: string, role: "owner" | "keeper" | "viewer") {
  await c.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, $3)`, [userId, farmId, role]);
}

export type Mail = { id: string; to: string[]; from: string; subject: string; text: string; html: string | null };

export async function mailFor(address: string): Promise<Mail[]> {
  const r = await fetch(`${inject("mailboxUrl")}/messages`);
  return ((await r.json()) as Mail[]).filter((m) => m.to.some((t) => t.toLowerCase() === address.toLowerCase()));
}

/** Waits until `address` has at least `n` mails (mail may leave after the HTTP answer). */
export async function waitForMail(address: string, n = 1, timeoutMs = 15_000): Promise<Mail[]> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const got = await mailFor(address);
    if (got.length >= n) return got;
    if (Date.now() > until) throw new Error(`expected ${n} mail(s) for ${address}, got ${got.length}`);
    await new Promise((r) => setTimeout(r, 100));
  }
}

/** The path of the first link in a mail's text that starts with `${appUrl}${prefix}`. */
export function linkIn(mail: Mail, prefix: string): string {
  const m = mail.text.match(new RegExp(`https?://[^\\s/]+(${prefix}[A-Za-z0-9_-]+)`));
  if (!m) throw new Error(`no ${prefix} link in mail "${mail.subject}"`);
  return m[1]!;
}
