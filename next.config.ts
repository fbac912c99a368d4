import type { NextConfig } from "next";

const config: NextConfig = {
  poweredByHeader: false,
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
