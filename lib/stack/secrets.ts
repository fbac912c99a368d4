import { randomBytes } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import webpush from "web-push";

export type Secrets = { nextauthSecret: string; vapidPublicKey: string; vapidPrivateKey: string };

// Made at first start and kept in .data/ (git-ignored), so sessions and push subscriptions survive restarts.
export function loadSecrets(dataDir: string): Secrets {
  const file = path.join(dataDir, "secrets.json");
  if (fs.existsSync(file)) return JSON.parse(fs.readFileSync(file, "utf8")) as Secrets;
  const vapid = webpush.generateVAPIDKeys();
  const s: Secrets = {
    nextauthSecret: randomBytes(32).toString("base64url"),
    vapidPublicKey: vapid.publicKey,
    vapidPrivateKey: vapid.privateKey,
  };
  fs.mkdirSync(dataDir, { recursive: true });
  fs.writeFileSync(file, JSON.stringify(s, null, 2), { mode: 0o600 });
  return s;
}
