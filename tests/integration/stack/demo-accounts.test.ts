// The demo people share a published password: `npm start` seeds them on its own cluster only, and
// a database named by DATABASE_URL gets them only with WORMWARD_DEMO=1. Run against fresh
// databases made from the migrated template on the test cluster.
import { spawn } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { inject } from "vitest";
import bcrypt from "bcryptjs";
import { DEMO_PEOPLE } from "@/db/seed";
import { PASSWORD_TOO_LONG } from "@/lib/domain/password-rules";
import { seedForStart } from "@/lib/stack/seed-demo";
import { TEMPLATE } from "../../setup/global";

const adminUrl = inject("adminUrl");
const root = path.resolve(import.meta.dirname, "../../..");
const made: string[] = [];
const dir = fs.mkdtempSync(path.join(os.tmpdir(), "wormward-demo-"));

async function admin(sql: string) {
  const c = new pg.Client({ connectionString: adminUrl });
  await c.connect();
  try {
    await c.query(sql);
  } finally {
    await c.end();
  }
}

async function freshDatabase(): Promise<string> {
  const name = `wormward_demo_${process.pid}_${made.length}`;
  await admin(`drop database if exists "${name}" with (force)`);
  await admin(`create database "${name}" template ${TEMPLATE}`);
  made.push(name);
  return adminUrl.replace(/\/postgres$/, `/${name}`);
}

async function count(url: string, sql: string, params: unknown[] = []): Promise<number> {
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    return (await c.query(sql, params)).rows[0].n as number;
  } finally {
    await c.end();
  }
}

const demoPeople = (url: string) => count(url, `select count(*)::int as n from users where email = any($1)`, [DEMO_PEOPLE.map((p) => p.email)]);

beforeAll(() => {
  expect(new URL(adminUrl).hostname).toBe("127.0.0.1");
});
afterAll(async () => {
  for (const name of made) await admin(`drop database if exists "${name}" with (force)`);
  fs.rmSync(dir, { recursive: true, force: true });
});

describe("demo accounts only in the demo", () => {
  it("demo people are not seeded into a DATABASE_URL database without the flag", async () => {
    const url = await freshDatabase();
    const probesFile = path.join(dir, "no-flag.json");
    const r = await seedForStart(url, probesFile, { ownCluster: false, flag: undefined });
    expect(r).toEqual({ demo: false, seeded: false });
    expect(await count(url, `select count(*)::int as n from users`)).toBe(0);
    expect(await count(url, `select count(*)::int as n from farms`)).toBe(0);
    expect(fs.existsSync(probesFile)).toBe(false);
    // The shared ingredient library is not demo data: it is there either way.
    expect(await count(url, `select count(*)::int as n from ingredients where farm_id is null`)).toBeGreaterThan(10);
    // A second start without the flag still adds no one.
    await seedForStart(url, probesFile, { ownCluster: false, flag: "0" });
    expect(await demoPeople(url)).toBe(0);
  });

  it("WORMWARD_DEMO=1 seeds the demo into a DATABASE_URL database", async () => {
    const url = await freshDatabase();
    const probesFile = path.join(dir, "flag.json");
    // Two days of history: these tests are about the people (demo-history.test.ts covers the history).
    expect(await seedForStart(url, probesFile, { ownCluster: false, flag: "1", historyDays: 2 })).toMatchObject({ demo: true, seeded: true });
    expect(await demoPeople(url)).toBe(3);
    expect(JSON.parse(fs.readFileSync(probesFile, "utf8")).length).toBeGreaterThan(0);
  });

  it("npm start's own cluster gets the demo, unless WORMWARD_DEMO=0", async () => {
    const own = await freshDatabase();
    expect(await seedForStart(own, path.join(dir, "own.json"), { ownCluster: true, flag: undefined, historyDays: 2 })).toMatchObject({
      demo: true,
      seeded: true,
    });
    expect(await demoPeople(own)).toBe(3);
    const optedOut = await freshDatabase();
    expect(await seedForStart(optedOut, path.join(dir, "out.json"), { ownCluster: true, flag: "0" })).toEqual({ demo: false, seeded: false });
    expect(await demoPeople(optedOut)).toBe(0);
  });

  it("without the demo, the first owner is made from the command line, the password read from standard input", async () => {
    const url = await freshDatabase();
    const run = (args: string[], stdin: string) =>
      new Promise<{ code: number | null; out: string }>((resolve) => {
        const child = spawn(path.join(root, "node_modules", ".bin", "tsx"), ["lib/stack/add-owner.ts", ...args], {
          cwd: root,
          env: { ...process.env, DATABASE_URL: url },
        });
        let out = "";
        child.stdout.on("data", (d) => (out += d));
        child.stderr.on("data", (d) => (out += d));
        child.on("exit", (code) => resolve({ code, out }));
        child.stdin.end(`${stdin}\n`);
      });
    const long = await run(["fern@example.org", "Fern Oduya", "Back Garden"], "ü".repeat(37));
    expect(long.code).toBe(1);
    expect(long.out).toContain(`password: ${PASSWORD_TOO_LONG}`);
    expect(await count(url, `select count(*)::int as n from users`)).toBe(0);

    const ok = await run(["Fern@Example.org", "Fern Oduya", "Back Garden"], "castings-and-coffee");
    expect(ok.code, ok.out).toBe(0);
    expect(ok.out).toContain("fern@example.org owns Back Garden");
    const c = new pg.Client({ connectionString: url });
    await c.connect();
    try {
      const r = await c.query(
        `select u.password_hash, m.role, f.name from users u join memberships m on m.user_id = u.id join farms f on f.id = m.farm_id where u.email = 'fern@example.org'`,
      );
      expect(r.rows).toHaveLength(1);
      expect(r.rows[0].role).toBe("owner");
      expect(r.rows[0].name).toBe("Back Garden");
      expect(await bcrypt.compare("castings-and-coffee", r.rows[0].password_hash)).toBe(true);
    } finally {
      await c.end();
    }
    // The same e-mail again is refused and names the field.
    const again = await run(["fern@example.org", "Someone Else", "Other Farm"], "another-good-password");
    expect(again.code).toBe(1);
    expect(again.out).toContain("email: fern@example.org already has an account.");
  });
});
