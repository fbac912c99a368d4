// One PostgreSQL cluster per test run, a migrated template database, and (when the app is built)
// one production Next.js server over a seeded database for the API and browser tests.
import { spawn, type ChildProcess } from "node:child_process";
import fs from "node:fs";
import net from "node:net";
import path from "node:path";
import pg from "pg";
import type { TestProject } from "vitest/node";
import { startCluster, stopCluster } from "../../db/local-pg";
import { runMigrations } from "../../db/migrate";
import { startMailbox } from "../../fakes/mailbox";
import { startPushService } from "../../fakes/push-service";
import { makeVapidKeys } from "../../lib/server/push/push";

const root = path.resolve(import.meta.dirname, "../..");
export const TEMPLATE = "wormward_template";
export const APP_DB = "wormward_app";

declare module "vitest" {
  export interface ProvidedContext {
    adminUrl: string;
    appUrl: string | null;
    appDbUrl: string;
    clusterName: string;
    pushCaFile: string;
    demoProbesFile: string;
    nextauthSecret: string;
    pushServiceUrl: string;
    mailboxUrl: string;
    smtpPort: number;
    vapidPublicKey: string;
    /** The port the app tells probes to publish to (PUBLIC_MQTT_URL); a test starts the broker there. */
    probeBrokerPort: number;
  }
}

export async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.listen(0, "127.0.0.1", () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
    s.on("error", reject);
  });
}

async function admin(adminUrl: string, sqls: string[]) {
  const c = new pg.Client({ connectionString: adminUrl });
  await c.connect();
  try {
    for (const s of sqls) await c.query(s);
  } finally {
    await c.end();
  }
}

let app: ChildProcess | null = null;

export default async function setup(project: TestProject) {
  // WORMWARD_TEST_CLUSTER / _PORT let two runs on one machine keep apart (default pg-test:54339).
  const clusterName = process.env.WORMWARD_TEST_CLUSTER ?? "pg-test";
  const cluster = await startCluster({ name: clusterName, port: Number(process.env.WORMWARD_TEST_PG_PORT ?? 54339) });
  const adminUrl = cluster.adminUrl;
  const c = new pg.Client({ connectionString: adminUrl });
  await c.connect();
  const old = await c.query(`select datname from pg_database where datname like 'wormward_w%' or datname in ($1, $2)`, [TEMPLATE, APP_DB]);
  for (const r of old.rows) await c.query(`drop database if exists "${r.datname}" with (force)`);
  await c.end();
  await admin(adminUrl, [`create database ${TEMPLATE}`]);
  const templateUrl = adminUrl.replace(/\/postgres$/, `/${TEMPLATE}`);
  await runMigrations(templateUrl);
  await admin(adminUrl, [`create database ${APP_DB} template ${TEMPLATE}`]);
  const appDbUrl = adminUrl.replace(/\/postgres$/, `/${APP_DB}`);

  // Seed the app database in a child (the seed uses the app's module graph and its own pool).
  // The harness's own cluster asks for the demo farm and its people, as `npm start` does on its own.
  const { seedForStart } = await import("../../lib/stack/seed-demo");
  // The demo's 180 days of history (about 10 s to seed); WORMWARD_TEST_DEMO_DAYS shortens it for a quick local run.
  const historyDays = process.env.WORMWARD_TEST_DEMO_DAYS ? Number(process.env.WORMWARD_TEST_DEMO_DAYS) : undefined;
  await seedForStart(appDbUrl, path.join(root, ".data", `${clusterName}-demo-probes.json`), { ownCluster: true, flag: "1", historyDays });

  const nextauthSecret = "test-secret-0123456789abcdef";
  // Local stand-ins for the hosted push service and SMTP, shared by the app and the tests.
  const push = await startPushService({ port: 0 });
  const mailbox = await startMailbox({ smtpPort: 0, httpPort: 0 });
  const caFile = path.join(root, ".data", `${clusterName}-push-ca.pem`);
  fs.writeFileSync(caFile, push.ca);
  // The fake is the one push service on loopback that the app and the test workers may send to
  // (lib/server/push/push-policy.ts); workers inherit this environment.
  process.env.PUSH_FAKE_ORIGIN = push.url;
  const vapid = makeVapidKeys();
  let appUrl: string | null = null;
  // The broker address the app's connect snippets name; a test that runs them starts ingest there.
  const probeBrokerPort = await freePort();
  if (fs.existsSync(path.join(root, ".next", "BUILD_ID"))) {
    const port = await freePort();
    appUrl = `http://127.0.0.1:${port}`;
    const log = fs.openSync(path.join(root, ".data", `${clusterName}-web.log`), "w");
    app = spawn(path.join(root, "node_modules", ".bin", "next"), ["start", "-H", "127.0.0.1", "-p", String(port)], {
      cwd: root,
      env: {
        ...process.env,
        NODE_ENV: "production",
        DATABASE_URL: appDbUrl,
        NEXTAUTH_SECRET: nextauthSecret,
        NEXTAUTH_URL: appUrl,
        APP_URL: appUrl,
        NEXT_TELEMETRY_DISABLED: "1",
        VAPID_PUBLIC_KEY: vapid.publicKey,
        VAPID_PRIVATE_KEY: vapid.privateKey,
        PUSH_CA_FILE: caFile,
        PUSH_FAKE_ORIGIN: push.url,
        SMTP_PORT: String(mailbox.smtpPort),
        PUBLIC_MQTT_URL: `mqtt://127.0.0.1:${probeBrokerPort}`,
        // As behind one proxy (HAProxy `option forwardfor`): a test names a client address in
        // X-Forwarded-For; requests without one count as 127.0.0.1, filled in by `next start`.
        TRUSTED_PROXY_HOPS: "1",
        // One line per session and role lookup of a page, which tests/integration/pages counts.
        DEBUG: [process.env.DEBUG, "wormward:page-access"].filter(Boolean).join(","),
      },
      stdio: ["ignore", log, log],
    });
    const until = Date.now() + 60_000;
    for (;;) {
      try {
        if ((await fetch(`${appUrl}/sign-in`)).ok) break;
      } catch {
        /* starting */
      }
      if (Date.now() > until) throw new Error("next start did not come up; see .data/test-web.log");
      await new Promise((r) => setTimeout(r, 250));
    }
  } else {
    console.warn("No .next build: API and browser tests will fail. `npm test` builds first.");
  }

  project.provide("adminUrl", adminUrl);
  project.provide("appUrl", appUrl);
  project.provide("appDbUrl", appDbUrl);
  project.provide("clusterName", clusterName);
  project.provide("pushCaFile", caFile);
  project.provide("demoProbesFile", path.join(root, ".data", `${clusterName}-demo-probes.json`));
  project.provide("nextauthSecret", nextauthSecret);
  project.provide("pushServiceUrl", push.url);
  project.provide("mailboxUrl", mailbox.httpUrl);
  project.provide("smtpPort", mailbox.smtpPort);
  project.provide("probeBrokerPort", probeBrokerPort);
  project.provide("vapidPublicKey", vapid.publicKey);

  return async () => {
    app?.kill("SIGTERM");
    await push.close();
    await mailbox.close();
    stopCluster(clusterName);
  };
}
