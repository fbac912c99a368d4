import fs from "node:fs";
import path from "node:path";
import { chromium, type Browser } from "playwright-core";

// Debian's Chromium, headless, with the flags that keep it off the closed network.
export async function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: "/usr/bin/chromium",
    headless: true,
    args: ["--no-sandbox", "--disable-gpu", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--no-first-run"],
  });
}

export const PHONE = { viewport: { width: 390, height: 844 }, deviceScaleFactor: 2, isMobile: true, hasTouch: true };

export function screenshotPath(name: string) {
  const dir = path.resolve(import.meta.dirname, "../../.data/screens");
  fs.mkdirSync(dir, { recursive: true });
  return path.join(dir, `${name}.png`);
}
