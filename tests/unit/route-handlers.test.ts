import fs from "node:fs";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";

// Every route handler is at most: who → parse → one use-case call → respond. The decisions live in
// a use case under lib/server/, so a server action, a page and a handler share them.
const ROOT = path.resolve(import.meta.dirname, "../..");
const MAX_STATEMENTS = 5;
const ALLOWED_IMPORT = /^(@\/lib\/(web|server|domain\/validation)\/|next\/server$|next-auth$)/;

function routeFiles(dir = path.join(ROOT, "app/api")): string[] {
  return fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name);
    if (e.isDirectory()) return routeFiles(p);
    return e.name === "route.ts" ? [path.relative(ROOT, p)] : [];
  });
}

type Handler = { name: string; statements: number; useCaseCalls: string[] };

/** The exported handlers of a route file: how many statements each runs and which use cases it calls. */
function inspect(file: string, text: string): { imports: string[]; handlers: Handler[] } {
  const src = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true, ts.ScriptKind.TS);
  const imports: string[] = [];
  const useCases = new Set<string>();
  const handlers: Handler[] = [];
  for (const st of src.statements) {
    if (ts.isImportDeclaration(st) && ts.isStringLiteral(st.moduleSpecifier)) {
      const spec = st.moduleSpecifier.text;
      imports.push(spec);
      const names = st.importClause?.namedBindings;
      if (spec.startsWith("@/lib/server/") && names && ts.isNamedImports(names)) {
        for (const n of names.elements) if (!n.isTypeOnly && !st.importClause?.isTypeOnly) useCases.add(n.name.text);
      }
    }
  }
  const bodyOf = (e: ts.Expression): ts.ConciseBody | undefined => {
    if (ts.isArrowFunction(e) || ts.isFunctionExpression(e)) return e.body;
    if (ts.isCallExpression(e)) for (const a of e.arguments) if (bodyOf(a)) return bodyOf(a);
    return undefined;
  };
  for (const st of src.statements) {
    const exported = ts.canHaveModifiers(st) && ts.getModifiers(st)?.some((m) => m.kind === ts.SyntaxKind.ExportKeyword);
    if (!exported) continue;
    const decls: [string, ts.ConciseBody | undefined][] = [];
    if (ts.isVariableStatement(st)) {
      for (const d of st.declarationList.declarations) if (ts.isIdentifier(d.name) && d.initializer) decls.push([d.name.text, bodyOf(d.initializer)]);
    } else if (ts.isFunctionDeclaration(st) && st.name) decls.push([st.name.text, st.body]);
    for (const [name, body] of decls) {
      if (!body || !/^(GET|POST|PUT|PATCH|DELETE)$/.test(name)) continue;
      const calls: string[] = [];
      const visit = (n: ts.Node) => {
        if (ts.isCallExpression(n) && ts.isIdentifier(n.expression) && useCases.has(n.expression.text)) calls.push(n.expression.text);
        ts.forEachChild(n, visit);
      };
      visit(body);
      handlers.push({ name, statements: ts.isBlock(body) ? body.statements.length : 1, useCaseCalls: calls });
    }
  }
  return { imports, handlers };
}

/** What is wrong with one route file, in words; empty when it is thin. */
function problems(file: string, text: string): string[] {
  const { imports, handlers } = inspect(file, text);
  const out = imports.filter((i) => !ALLOWED_IMPORT.test(i)).map((i) => `${file} imports ${i}: a handler needs only lib/web, lib/server and a schema`);
  for (const h of handlers) {
    if (h.statements > MAX_STATEMENTS) out.push(`${file} ${h.name}: ${h.statements} statements (at most ${MAX_STATEMENTS})`);
    if (h.useCaseCalls.length > 1) out.push(`${file} ${h.name}: calls ${h.useCaseCalls.join(", ")} (one use case per handler)`);
  }
  return out;
}

describe("route handlers are thin", () => {
  it("every handler is who → parse → one use case → respond, importing only web glue, use cases and schemas", () => {
    const files = routeFiles();
    expect(files.length).toBeGreaterThan(30);
    const handlers = files.flatMap((f) => inspect(f, fs.readFileSync(path.join(ROOT, f), "utf8")).handlers);
    expect(handlers.length).toBeGreaterThan(50);
    const found = files.flatMap((f) => problems(f, fs.readFileSync(path.join(ROOT, f), "utf8")));
    expect(found, found.join("\n")).toEqual([]);
  });

  it("names a handler that runs logic itself, calls two use cases or imports db/", () => {
    const fat = `import { route } from "@/lib/web/api/route";
import { listBins } from "@/db/queries/bins";
import { a, b } from "@/lib/server/bins/x";
export const GET = route(async (req) => {
  const x = 1;
  const y = 2;
  const z = 3;
  const w = 4;
  const v = 5;
  return Response.json({ x, y, z, w, v, bins: await listBins(), a: await a(), b: await b() });
});`;
    expect(problems("app/api/x/route.ts", fat)).toEqual([
      "app/api/x/route.ts imports @/db/queries/bins: a handler needs only lib/web, lib/server and a schema",
      "app/api/x/route.ts GET: 6 statements (at most 5)",
      "app/api/x/route.ts GET: calls a, b (one use case per handler)",
    ]);
    const thin = `import { route } from "@/lib/web/api/route";
import { requireMember } from "@/lib/web/session";
import { readJson } from "@/lib/web/errors";
import { binUpdate } from "@/lib/domain/validation/farm";
import { updateBin } from "@/lib/server/bins/update-bin";
export const PATCH = route(async (req, { params }) => {
  const { binId } = await params;
  const who = await requireMember({ binId }, "manage");
  const input = binUpdate.parse(await readJson(req));
  return Response.json(await updateBin(who, binId, input));
});`;
    expect(problems("app/api/y/route.ts", thin)).toEqual([]);
  });
});
