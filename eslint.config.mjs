// ESLint: Next.js's own rules (core web vitals), typescript-eslint and react-hooks, as
// eslint-config-next 16 bundles them (Next.js docs, "ESLint Plugin", flat config).
import { defineConfig, globalIgnores } from "eslint/config";
import nextVitals from "eslint-config-next/core-web-vitals";
import nextTs from "eslint-config-next/typescript";

export default defineConfig([
  ...nextVitals,
  ...nextTs,
  {
    rules: {
      // A leading underscore marks a value left out on purpose (a destructured secret, an ignored key).
      "@typescript-eslint/no-unused-vars": ["error", { argsIgnorePattern: "^_", varsIgnorePattern: "^_", ignoreRestSiblings: true }],
      // Our only images are the app's own small SVG mark; next/image would not optimise an SVG anyway.
      "@next/next/no-img-element": "off",
    },
  },
  globalIgnores([".next/**", ".data/**", "node_modules/**", "db/migrations/**", "next-env.d.ts"]),
]);
