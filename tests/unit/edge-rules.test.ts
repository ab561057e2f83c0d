import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { join } from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import { repoRoot } from "../support/processes";

// The rules of the route edge (issue 13, "one edge for errors and access"), read from the source
// with TypeScript's own parser, so comments and strings do not count:
// - data and domain code refuse with domain errors and never build an HTTP answer;
// - the role-rank helper (atLeast, app/lib/domain/roles.ts) is called on the server only by
//   requireAccess (app/lib/http/access.server.ts) and by roles.ts's own rules;
// - every async loader and action in app/routes goes through an edge wrapper.

const files = (...paths: string[]) =>
  execFileSync("git", ["ls-files", "--cached", "--others", "--exclude-standard", ...paths], {
    cwd: repoRoot,
    encoding: "utf8",
  })
    .split("\n")
    .filter((path) => /\.tsx?$/.test(path) && !/\.test\.tsx?$/.test(path));

function parse(path: string): ts.SourceFile {
  const text = readFileSync(join(repoRoot, path), "utf8");
  return ts.createSourceFile(path, text, ts.ScriptTarget.Latest, true);
}

function walk(node: ts.Node, visit: (node: ts.Node) => void) {
  visit(node);
  node.forEachChild((child) => walk(child, visit));
}

const calleeName = (node: ts.Node) =>
  ts.isCallExpression(node) && ts.isIdentifier(node.expression) ? node.expression.text : null;

describe("the route edge", () => {
  it("data and domain code build no HTTP answers (Response, data(), redirect())", () => {
    const found: string[] = [];
    const lower = files("app/lib/data", "app/lib/domain");
    expect(lower.length).toBeGreaterThan(20);
    for (const path of lower) {
      walk(parse(path), (node) => {
        const name = calleeName(node);
        if (name === "data" || name === "redirect") found.push(`${path}: ${name}()`);
        if (ts.isIdentifier(node) && node.text === "Response") found.push(`${path}: Response`);
        if (ts.isImportDeclaration(node) && /react-router/.test(node.moduleSpecifier.getText()))
          found.push(`${path}: imports react-router`);
      });
    }
    expect(found).toEqual([]);
  });

  it("only requireAccess compares roles by rank on the server", () => {
    const allowed = new Set(["app/lib/domain/roles.ts", "app/lib/http/access.server.ts"]);
    const callers = new Set<string>();
    const server = files("app/lib", "server").concat(
      files("app/routes").filter((p) => p.endsWith(".ts")),
    );
    for (const path of server)
      walk(parse(path), (node) => {
        if (calleeName(node) === "atLeast") callers.add(path);
      });
    expect([...callers].filter((path) => !allowed.has(path))).toEqual([]);
    expect(callers.has("app/lib/http/access.server.ts")).toBe(true);
  });

  it("every async loader and action goes through pageRoute, panelRoute or apiRoute", () => {
    // /healthz answers its own JSON and is called bare by its test.
    const bare: string[] = [];
    for (const path of files("app/routes")) {
      if (path === "app/routes/healthz.ts") continue;
      walk(parse(path), (node) => {
        if (
          ts.isFunctionDeclaration(node) &&
          (node.name?.text === "loader" || node.name?.text === "action") &&
          node.modifiers?.some((m) => m.kind === ts.SyntaxKind.ExportKeyword) &&
          node.modifiers.some((m) => m.kind === ts.SyntaxKind.AsyncKeyword)
        )
          bare.push(`${path}: ${node.name.text}`);
      });
    }
    expect(bare).toEqual([]);
  });
});
