import { spawnSync } from "node:child_process";
import fs from "node:fs";

// Debian packages the product and its tests use, found or installed (we are root on CI).
const wanted: Record<string, string> = {
  chromium: "/usr/bin/chromium",
  "mosquitto-clients": "/usr/bin/mosquitto_pub",
  openssl: "/usr/bin/openssl",
  "redis-server": "/usr/bin/redis-server",
  haproxy: "/usr/sbin/haproxy",
};

export function ensureOsPackages(names: (keyof typeof wanted)[]) {
  const missing = names.filter((n) => !fs.existsSync(wanted[n]!));
  if (missing.length === 0) return;
  if (process.getuid?.() !== 0) {
    throw new Error(`Missing Debian packages: ${missing.join(", ")}. Install them with: sudo apt-get install -y ${missing.join(" ")}`);
  }
  console.log(`Installing ${missing.join(", ")} from Debian's packages…`);
  const env = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  spawnSync("apt-get", ["update"], { stdio: "inherit", env });
  const r = spawnSync("apt-get", ["install", "-y", "--no-install-recommends", ...missing], { stdio: "inherit", env });
  if (r.status !== 0) throw new Error(`apt-get install ${missing.join(" ")} failed`);
}
