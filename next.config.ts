import type { NextConfig } from "next";

const config: NextConfig = {
  poweredByHeader: false,
  // `npm test` runs `tsc --noEmit` over the whole repo (tests included) before building, so the
  // build may skip its own, narrower pass there.
  typescript: { ignoreBuildErrors: process.env.WORMWARD_TYPECHECKED === "1" },
  // The ingest service and the tests import db/ and lib/ directly; the app bundles the same code.
  serverExternalPackages: ["pg", "aedes", "web-push", "nodemailer", "bcryptjs"],
  headers: async () => [
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
