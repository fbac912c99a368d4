import { env } from "@/lib/server/env";

const UNSAFE = new Set(["POST", "PUT", "PATCH", "DELETE"]);

/** Origins our pages are served from: the public URL, and next-auth's if it differs. */
export function appOrigins(): string[] {
  const e = env();
  return [...new Set([e.APP_URL, e.NEXTAUTH_URL].filter((u): u is string => !!u).map((u) => new URL(u).origin))];
}

/**
 * A change sent by a page of another site (OWASP CSRF Prevention Cheat Sheet, "Using Standard
 * Headers to Verify Origin" and "Fetch Metadata headers"): a browser names the page's origin on
 * every cross-origin POST, PUT, PATCH and DELETE (Fetch standard, "append a request `Origin`
 * header"), and says `Sec-Fetch-Site: cross-site`. A request without Origin comes from no browser
 * page (a probe, curl, a script) and carries no cookie of a visitor's (the session cookie is
 * SameSite=Lax), so it passes to its own credentials check. "null" (a sandboxed frame, a
 * redirect across sites) is not ours.
 */
export function isCrossSiteChange(req: Request, ours: readonly string[]): boolean {
  if (!UNSAFE.has(req.method.toUpperCase())) return false;
  if (req.headers.get("sec-fetch-site")?.toLowerCase() === "cross-site") return true;
  const origin = req.headers.get("origin");
  if (origin === null) return false;
  if (ours.includes(origin)) return false;
  // The request's own host: the app reached by another name than APP_URL (a LAN address, say).
  try {
    return new URL(origin).host !== req.headers.get("host");
  } catch {
    return true;
  }
}
