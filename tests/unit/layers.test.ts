import { execFileSync } from "node:child_process";
import fs from "node:fs";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";

// The layers of DEVELOPERS.md, checked on the import graph of the tracked source:
//   lib/domain  pure: no database, no framework, no node I/O, no other layer of lib/
//   lib/server  use cases and services: may use domain and db/, never web glue or the client
//   lib/web     Next.js glue: route(), errors, session, server-action wrapper
//   lib/client  hooks, fetcher, keys, wire types: what components may import
//   db/queries  plain named reads and writes: no HTTP error, no use-case error, no web glue
// and app/ and components/ never reach db/ themselves: they call a use case.
const ROOT = path.resolve(import.meta.dirname, "../..");

function tracked(): string[] {
  const out = execFileSync("git", ["ls-files", "--cached", "--others", "--exclude-standard"], { cwd: ROOT, encoding: "utf8" });
  return out
    .split("\n")
    .filter((f) => /\.(ts|tsx)$/.test(f) && !f.endsWith(".d.ts"))
    .filter((f) => fs.existsSync(path.join(ROOT, f)));
}

/** Every module specifier a file imports, re-exports or loads with import(): type imports too. */
function specifiersOf(file: string, text: string): { spec: string; typeOnly: boolean }[] {
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, false, file.endsWith("x") ? ts.ScriptKind.TSX : ts.ScriptKind.TS);
  const found: { spec: string; typeOnly: boolean }[] = [];
  const visit = (node: ts.Node) => {
    if (ts.isImportDeclaration(node) && ts.isStringLiteral(node.moduleSpecifier)) {
      found.push({ spec: node.moduleSpecifier.text, typeOnly: !!node.importClause?.isTypeOnly });
    } else if (ts.isExportDeclaration(node) && node.moduleSpecifier && ts.isStringLiteral(node.moduleSpecifier)) {
      found.push({ spec: node.moduleSpecifier.text, typeOnly: node.isTypeOnly });
    } else if (ts.isCallExpression(node) && node.expression.kind === ts.SyntaxKind.ImportKeyword) {
      const [arg] = node.arguments;
      if (arg && ts.isStringLiteral(arg)) found.push({ spec: arg.text, typeOnly: false });
    } else if (ts.isImportTypeNode(node) && ts.isLiteralTypeNode(node.argument) && ts.isStringLiteral(node.argument.literal)) {
      found.push({ spec: node.argument.literal.text, typeOnly: true });
    }
    ts.forEachChild(node, visit);
  };
  visit(source);
  return found;
}

/** A specifier as a path from the repository root ("db/queries/bins"), or the package name. */
function target(file: string, spec: string): string {
  if (spec.startsWith("@/")) return path.posix.normalize(spec.slice(2));
  if (spec.startsWith(".")) return path.posix.normalize(path.posix.join(path.posix.dirname(file), spec));
  return spec;
}

const NODE_IO = /^(node:)?(fs|net|dns|http|https|http2|tls|dgram|child_process|cluster|worker_threads|readline|os|crypto)(\/|$)/;
const FRAMEWORK = /^(next|next-auth|react|react-dom|swr|pg|drizzle-orm|nodemailer|web-push|mqtt|aedes)(\/|$)/;

// lib/client/wire.ts is the one seam where the type of a row or a use case's answer (never its
// code) crosses to the client: it may import types, and only types, from db/ and lib/server.
const WIRE = "lib/client/wire.ts";
const seam = (f: string, typeOnly: boolean) => f === WIRE && typeOnly;

type Rule = { name: string; applies: (file: string) => boolean; refuses: (to: string) => boolean };
const RULES: Rule[] = [
  {
    name: "components, the client layer and app/ do not import db/",
    applies: (f) => f.startsWith("components/") || f.startsWith("app/") || f.startsWith("lib/client/"),
    refuses: (to) => to === "db" || to.startsWith("db/"),
  },
  {
    name: "the pure layer imports no database, framework, node I/O or other layer",
    applies: (f) => f.startsWith("lib/domain/"),
    refuses: (to) => to === "db" || to.startsWith("db/") || FRAMEWORK.test(to) || NODE_IO.test(to) || /^lib\/(server|web|client|stack)\//.test(to),
  },
  {
    name: "db/queries imports no error of the web or use-case layers and no web glue",
    applies: (f) => f.startsWith("db/queries/"),
    refuses: (to) => to.startsWith("lib/web/") || to === "lib/domain/errors" || to.startsWith("lib/server/") || to.startsWith("lib/client/"),
  },
  {
    name: "the server layer does not reach up into web glue or the client",
    applies: (f) => f.startsWith("lib/server/"),
    refuses: (to) => to.startsWith("lib/web/") || to.startsWith("lib/client/") || /^(react|react-dom|swr|next)(\/|$)/.test(to),
  },
  {
    name: "components and the client layer import nothing of the server layer or node I/O",
    applies: (f) => f.startsWith("components/") || f.startsWith("lib/client/"),
    refuses: (to) => to.startsWith("lib/server/") || NODE_IO.test(to),
  },
];

function violations(files: { file: string; text: string }[]): string[] {
  return files.flatMap(({ file, text }) =>
    specifiersOf(file, text).flatMap(({ spec, typeOnly }) => {
      if (seam(file, typeOnly)) return [];
      const to = target(file, spec);
      return RULES.filter((r) => r.applies(file) && r.refuses(to)).map((r) => `${file} → ${spec}: ${r.name}`);
    }),
  );
}

describe("the import graph keeps the layers", () => {
  it("no file imports across a layer it must not", () => {
    const files = tracked();
    // The walk reached every layer, so an empty list of violations means something.
    for (const dir of ["lib/domain/", "lib/server/", "lib/web/", "lib/client/", "db/queries/", "components/", "app/api/"]) {
      expect(
        files.some((f) => f.startsWith(dir)),
        dir,
      ).toBe(true);
    }
    const found = violations(files.map((file) => ({ file, text: fs.readFileSync(path.join(ROOT, file), "utf8") })));
    expect(found, found.join("\n")).toEqual([]);
  });

  it("each rule refuses what it names and lets the rest through", () => {
    const found = violations([
      {
        file: "components/x.tsx",
        text: 'import type { Bin } from "@/db/schema";\nimport { useToday } from "@/lib/client/hooks/use-today";\nimport { env } from "@/lib/server/env";',
      },
      { file: "app/api/x/route.ts", text: 'import { listBins } from "../../../db/queries/bins";' },
      {
        file: "lib/domain/x.ts",
        text: 'import fs from "node:fs";\nimport { z } from "zod";\nconst m = await import("next/headers");\nimport { units } from "./units";',
      },
      { file: "lib/domain/y.ts", text: 'import type { Who } from "@/lib/server/auth/authorize";' },
      { file: "db/queries/x.ts", text: 'import { AppError } from "@/lib/domain/errors";\nimport { ZONE_KINDS } from "@/lib/domain/vocabulary";' },
      { file: "lib/server/x.ts", text: 'import { route } from "@/lib/web/api/route";\nimport { listBins } from "@/db/queries/bins";' },
      { file: "lib/client/x.ts", text: 'type P = import("@/lib/server/env").Env;' },
      { file: "lib/client/wire.ts", text: 'import type { Today } from "@/db/queries/today";\nimport { getToday } from "@/db/queries/today";' },
    ]);
    expect(found.map((v) => v.split(":")[0])).toEqual([
      "components/x.tsx → @/db/schema",
      "components/x.tsx → @/lib/server/env",
      "app/api/x/route.ts → ../../../db/queries/bins",
      "lib/domain/x.ts → node",
      "lib/domain/x.ts → next/headers",
      "lib/domain/y.ts → @/lib/server/auth/authorize",
      "db/queries/x.ts → @/lib/domain/errors",
      "lib/server/x.ts → @/lib/web/api/route",
      "lib/client/x.ts → @/lib/server/env",
      "lib/client/wire.ts → @/db/queries/today",
    ]);
  });
});
