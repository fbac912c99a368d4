// Response headers for every answer: pages and files (set in proxy.ts, pages with a fresh nonce) and
// API routes (next.config.ts). Values after the OWASP HTTP Headers Cheat Sheet and CSP Level 3.
// Relative imports only: next.config.ts loads this file outside the "@/" alias.
import { env } from "../../server/env";

/** 128 random bits, base64: a nonce-source must be unguessable and new for every response (CSP Level 3, "Nonce Reuse"). */
export function newNonce(): string {
  return Buffer.from(crypto.getRandomValues(new Uint8Array(16))).toString("base64");
}

const policy = (directives: Record<string, string>) =>
  Object.entries(directives)
    .map(([k, v]) => (v ? `${k} ${v}` : k))
    .join("; ");

/**
 * The policy for pages. Scripts run only with this response's nonce, which Next puts on its own
 * scripts when the request carries the policy; 'strict-dynamic' lets those load their chunks (CSP
 * Level 3, "Usage of 'strict-dynamic'"), and 'self' stays only for browsers without it. Styles: our stylesheets and Next's nonced
 * inline ones; no style= attributes in HTML (uPlot and React set styles through CSSOM, which CSP
 * does not govern). worker-src is named because 'strict-dynamic' drops 'self' from script-src, the
 * fallback that would otherwise admit /sw.js.
 */
export function pagePolicy(nonce: string, o: { https: boolean; dev?: boolean }): string {
  return policy({
    "default-src": "'self'",
    // Next's development build needs eval for its error overlay; production never does.
    "script-src": `'self' 'nonce-${nonce}' 'strict-dynamic'${o.dev ? " 'unsafe-eval'" : ""}`,
    // In development Next injects un-nonced styles, and a nonce would switch 'unsafe-inline' off.
    "style-src": o.dev ? "'self' 'unsafe-inline'" : `'self' 'nonce-${nonce}'`,
    "img-src": "'self' data: blob:",
    "font-src": "'self'",
    "connect-src": "'self'",
    "worker-src": "'self'",
    "manifest-src": "'self'",
    "object-src": "'none'",
    "base-uri": "'self'",
    "form-action": "'self'",
    "frame-ancestors": "'none'",
    ...(o.https ? { "upgrade-insecure-requests": "" } : {}),
  });
}

/** JSON answers load nothing and are framed by nobody (OWASP REST Security Cheat Sheet, "Security headers"). */
export const API_POLICY = policy({ "default-src": "'none'", "frame-ancestors": "'none'" });

/**
 * next-auth's own pages (sign-out, error) carry an inline <style> and no script; their forms post
 * to /api/auth. Inline styles there, never scripts.
 */
export const AUTH_PAGES_POLICY = policy({
  "default-src": "'none'",
  "style-src": "'unsafe-inline'",
  "img-src": "'self'",
  "form-action": "'self'",
  "base-uri": "'none'",
  "frame-ancestors": "'none'",
});

/** Two years, subdomains included (OWASP HTTP Headers Cheat Sheet, Strict-Transport-Security). */
export const HSTS = "max-age=63072000; includeSubDomains";

/** The headers every response carries besides its policy. */
export const COMMON_HEADERS: Readonly<Record<string, string>> = {
  "X-Content-Type-Options": "nosniff",
  // Our URLs name farms and bins: other sites get at most our origin (OWASP HTTP Headers Cheat Sheet).
  "Referrer-Policy": "strict-origin-when-cross-origin",
};

/**
 * HSTS only over https (a browser ignores it over http, RFC 6797 §8.1, and on a plain-http
 * install it would lock people out): when the app's public URL is https, or the request came over
 * TLS as the terminating proxy says (X-Forwarded-Proto).
 */
export function servedOverHttps(req: Request): boolean {
  const e = env();
  if ([e.APP_URL, e.NEXTAUTH_URL].some((u) => u?.startsWith("https:"))) return true;
  if (new URL(req.url).protocol === "https:") return true;
  return (req.headers.get("x-forwarded-proto") ?? "").split(",")[0]!.trim().toLowerCase() === "https";
}

/** All security headers for one response. */
export function securityHeaders(contentPolicy: string, https: boolean): [string, string][] {
  return [
    ["Content-Security-Policy", contentPolicy],
    ...Object.entries(COMMON_HEADERS),
    ...(https ? [["Strict-Transport-Security", HSTS] as [string, string]] : []),
  ];
}
