import type { NextConfig } from "next";
import { API_POLICY, AUTH_PAGES_POLICY, COMMON_HEADERS, HSTS } from "./lib/web/api/security-headers";

const common = Object.entries(COMMON_HEADERS).map(([key, value]) => ({ key, value }));

const config: NextConfig = {
  poweredByHeader: false,
  // `npm test` runs `tsc --noEmit` over the whole repo (tests included) before building, so the
  // build may skip its own, narrower pass there.
  typescript: { ignoreBuildErrors: process.env.WORMWARD_TYPECHECKED === "1" },
  // The ingest service and the tests import db/ and lib/ directly; the app bundles the same code.
  serverExternalPackages: ["pg", "aedes", "web-push", "nodemailer", "bcryptjs"],
  // proxy.ts runs on pages, so Next copies each POST body to a page (a server action) into memory
  // for it; hold at most what a server action accepts anyway (serverActions.bodySizeLimit, 1 MB).
  experimental: { proxyClientMaxBodySize: "1mb" },
  // Pages and files get their security headers from proxy.ts (with a nonce); API routes, which the
  // proxy skips, get theirs here: JSON answers and next-auth's own pages. The last match wins.
  headers: async () => [
    { source: "/api/:path*", headers: [{ key: "Content-Security-Policy", value: API_POLICY }, ...common] },
    { source: "/api/auth/:path*", headers: [{ key: "Content-Security-Policy", value: AUTH_PAGES_POLICY }] },
    // HSTS over TLS only (RFC 6797 §7.2); pages also send it when APP_URL is https.
    {
      source: "/api/:path*",
      has: [{ type: "header", key: "x-forwarded-proto", value: "https" }],
      headers: [{ key: "Strict-Transport-Security", value: HSTS }],
    },
    {
      source: "/sw.js",
      headers: [
        { key: "Cache-Control", value: "no-cache, no-store, must-revalidate" },
        { key: "Service-Worker-Allowed", value: "/" },
      ],
    },
  ],
};

export default config;
