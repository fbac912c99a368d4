// Push subscriptions through the built app: only a browser push service's https endpoint is
// accepted (never an address of our own network), saving one never takes another person's row,
// and the push test answers with the status and our own words, never the push service's answer.
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { hashPassword } from "@/lib/server/auth/password";
import { signIn, type Session } from "../../helpers/app";
import { newSubscriber, pushAttemptsFor } from "../../helpers/push";

let db: pg.Client;
let farmId: string;
const people: { id: string; email: string; session: Session }[] = [];
const password = "push-endpoints-pass";

async function subscriptionsOf(endpoint: string) {
  return (await db.query(`select user_id, p256dh, auth from push_subscriptions where endpoint = $1 order by created_at`, [endpoint])).rows as {
    user_id: string;
    p256dh: string;
    auth: string;
  }[];
}

beforeAll(async () => {
  db = new pg.Client({ connectionString: inject("appDbUrl") });
  await db.connect();
  farmId = (await db.query(`insert into farms (name) values ('Zz Push Endpoint Farm') returning id`)).rows[0].id;
  const hash = await hashPassword(password);
  for (const name of ["Ada", "Bea"]) {
    const email = `push-${name.toLowerCase()}-${Date.now()}@example.org`;
    const id = (await db.query(`insert into users (email, name, password_hash) values ($1, $2, $3) returning id`, [email, `${name} Keeper`, hash])).rows[0].id;
    await db.query(`insert into memberships (user_id, farm_id, role) values ($1, $2, 'keeper')`, [id, farmId]);
    people.push({ id, email, session: await signIn(email, password) });
  }
});

afterAll(async () => {
  if (db) {
    await db.query(`delete from users where id = any($1)`, [people.map((p) => p.id)]);
    await db.query(`delete from farms where id = $1`, [farmId]);
    await db.end();
  }
});

describe("push endpoints", () => {
  it("a push endpoint on 127.0.0.1 is refused", async () => {
    const ada = people[0]!;
    const keys = (await newSubscriber()).json.keys;
    // The fake push service lives on 127.0.0.1 too, but on its own port: another port is not it.
    const fakePort = Number(new URL(inject("pushServiceUrl")).port);
    const refused = [
      `https://127.0.0.1:${fakePort + 1}/push/abc`,
      "https://127.0.0.1/wp/abc",
      "https://localhost/push/abc",
      "https://[::1]/push/abc",
      "https://[::ffff:127.0.0.1]/push/abc",
      "https://10.0.0.8/push/abc",
      "https://169.254.169.254/latest/meta-data/",
      "https://intranet.example/push/abc",
      "http://fcm.googleapis.com/fcm/send/abc", // a push service, but not over https
      "https://user:pw@fcm.googleapis.com/fcm/send/abc",
    ];
    for (const endpoint of refused) {
      const res = await ada.session.fetch("/api/push/subscriptions", { method: "POST", json: { endpoint, keys } });
      expect(res.status, endpoint).toBe(422);
      const { error } = (await res.json()) as { error: { code: string; field: string; message: string } };
      expect(error, endpoint).toMatchObject({ code: "invalid", field: "endpoint" });
      expect(error.message).toMatch(/^endpoint: /);
      expect(await subscriptionsOf(endpoint)).toEqual([]);
    }
    // A push service the browsers use, and the configured fake, are accepted.
    for (const endpoint of ["https://fcm.googleapis.com/fcm/send/abc-123", (await newSubscriber()).json.endpoint]) {
      const res = await ada.session.fetch("/api/push/subscriptions", { method: "POST", json: { endpoint, keys } });
      expect(res.status, endpoint).toBe(201);
      await ada.session.fetch("/api/push/subscriptions", { method: "DELETE", json: { endpoint } });
    }
  });

  it("saving a push subscription never moves another person's subscription to the caller", async () => {
    const [ada, bea] = [people[0]!, people[1]!];
    const adas = await newSubscriber();
    expect((await ada.session.fetch("/api/push/subscriptions", { method: "POST", json: adas.json })).status).toBe(201);
    // Bea posts Ada's endpoint (it leaked, or a shared tablet) with keys of her own.
    const beas = await newSubscriber();
    const stolen = { endpoint: adas.json.endpoint, keys: beas.json.keys };
    expect((await bea.session.fetch("/api/push/subscriptions", { method: "POST", json: stolen })).status).toBe(201);

    const rows = await subscriptionsOf(adas.json.endpoint);
    expect(rows).toEqual([
      { user_id: ada.id, p256dh: adas.json.keys.p256dh, auth: adas.json.keys.auth },
      { user_id: bea.id, p256dh: beas.json.keys.p256dh, auth: beas.json.keys.auth },
    ]);
    // Bea taking hers away leaves Ada's in place.
    expect(await (await bea.session.fetch("/api/push/subscriptions", { method: "DELETE", json: { endpoint: adas.json.endpoint } })).json()).toEqual({
      removed: 1,
    });
    expect((await subscriptionsOf(adas.json.endpoint)).map((r) => r.user_id)).toEqual([ada.id]);
    await ada.session.fetch("/api/push/subscriptions", { method: "DELETE", json: { endpoint: adas.json.endpoint } });
  });

  it("the push test does not return what the push service said", async () => {
    const bea = people[1]!;
    const secret = "upstream-internal-host=10.1.2.3 token=sk_live_0123 <html>stack trace</html>";
    const chatty = await newSubscriber({ mode: "answers", status: 500, body: secret });
    expect((await bea.session.fetch("/api/push/subscriptions", { method: "POST", json: chatty.json })).status).toBe(201);

    const res = await bea.session.fetch("/api/push/test", { method: "POST" });
    expect(res.status).toBe(200);
    const text = await res.text();
    expect(await pushAttemptsFor(chatty.id)).toBe(1); // the push really went out and was answered
    for (const piece of ["upstream-internal-host", "10.1.2.3", "sk_live", "stack trace", "<html>"]) expect(text).not.toContain(piece);
    const body = JSON.parse(text) as { sent: number; results: { ok: boolean; status: number | null; reason?: string }[] };
    expect(body.sent).toBe(0);
    expect(body.results).toEqual([expect.objectContaining({ ok: false, status: 500, removed: false, reason: "the push service had a problem on its side" })]);
    await bea.session.fetch("/api/push/subscriptions", { method: "DELETE", json: { endpoint: chatty.json.endpoint } });
  });
});
