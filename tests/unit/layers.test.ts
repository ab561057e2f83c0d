import { execFileSync } from "node:child_process";
import { existsSync, readFileSync, statSync } from "node:fs";
import { dirname, join, relative, resolve } from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import { repoRoot } from "../support/processes";

// The layers as docs/architecture.md §5 writes them down: a module may import from its own layer
// or a lower one, never a higher one. The order is read from the document (the fenced block that
// starts with "layers, lowest first"), so the test and the design cannot drift apart. Imports are
// read with TypeScript's own pre-processor (ts.preProcessFile), type-only imports included: a type
// taken from a higher layer ties the lower one to it just the same.

const architecture = readFileSync(join(repoRoot, "docs/architecture.md"), "utf8");

interface Layer {
  rank: number;
  name: string;
  paths: string[];
}

function layersFromDocument(text: string): Layer[] {
  const block = /```text\nlayers, lowest first\n([\s\S]*?)```/.exec(text)?.[1];
  if (!block) throw new Error('docs/architecture.md has no "layers, lowest first" block');
  return block
    .split("\n")
    .filter((line) => line.trim() && !line.trimStart().startsWith("#"))
    .map((line, rank) => {
      const [name = "", ...paths] = line.trim().split(/\s+/);
      return { rank, name, paths };
    });
}

const layers = layersFromDocument(architecture);

/** The layer of a repository path: the one whose path is its longest prefix. */
function layerOf(path: string): Layer | undefined {
  let best: { layer: Layer; length: number } | undefined;
  for (const layer of layers) {
    for (const prefix of layer.paths) {
      const matches = prefix.endsWith("/") ? path.startsWith(prefix) : path === prefix;
      if (matches && (!best || prefix.length > best.length))
        best = { layer, length: prefix.length };
    }
  }
  return best?.layer;
}

const sources = execFileSync("git", ["ls-files", "app", "server"], {
  cwd: repoRoot,
  encoding: "utf8",
})
  .split("\n")
  .filter((path) => /\.tsx?$/.test(path) && !/\.test\.tsx?$/.test(path));

const isFile = (path: string) => existsSync(path) && statSync(path).isFile();

/** A relative or `~/` import resolved to a repository path; undefined for packages. */
function resolveImport(from: string, specifier: string): string | undefined {
  let base: string;
  if (specifier.startsWith("~/")) base = join(repoRoot, "app", specifier.slice(2));
  else if (specifier.startsWith(".")) base = resolve(dirname(join(repoRoot, from)), specifier);
  else return undefined;
  // React Router's generated route types (.react-router/types, `./+types/…`) are not modules.
  if (specifier.includes("/+types/")) return undefined;
  for (const ending of ["", ".ts", ".tsx", "/index.ts", "/index.tsx"]) {
    if (isFile(base + ending)) return relative(repoRoot, base + ending);
  }
  throw new Error(`${from}: cannot resolve "${specifier}"`);
}

function importsOf(path: string): string[] {
  const info = ts.preProcessFile(readFileSync(join(repoRoot, path), "utf8"), true, true);
  return info.importedFiles
    .map((file) => resolveImport(path, file.fileName))
    .filter((target): target is string => target !== undefined);
}

describe("layers (docs/architecture.md §5)", () => {
  it("the document names the layers in order", () => {
    expect(layers.map((layer) => layer.name)).toEqual([
      "base",
      "signal",
      "domain",
      "report",
      "infra",
      "analyses",
      "data",
      "http",
      "ui",
      "routes",
      "entry",
    ]);
  });

  it("every source module belongs to a layer", () => {
    expect(sources.filter((path) => !layerOf(path))).toEqual([]);
  });

  it("no module imports from a higher layer", () => {
    const wrongWay: string[] = [];
    for (const path of sources) {
      const own = layerOf(path);
      for (const target of importsOf(path)) {
        const theirs = layerOf(target);
        if (own && theirs && theirs.rank > own.rank)
          wrongWay.push(`${path} (${own.name}) → ${target} (${theirs.name})`);
      }
    }
    expect(wrongWay).toEqual([]);
  });

  it("reads imports the way the checker needs: a wrong-way import is found", () => {
    // The check itself, on a made-up pair: a domain rule that imports a component.
    const domain = layerOf("app/lib/domain/targets.ts");
    const component = layerOf("app/components/targets-card.tsx");
    expect(domain?.name).toBe("domain");
    expect(component?.name).toBe("ui");
    expect(component!.rank).toBeGreaterThan(domain!.rank);
    const found = ts.preProcessFile(
      'import type { X } from "~/components/y";\nimport("./z");',
      true,
      true,
    );
    expect(found.importedFiles.map((file) => file.fileName)).toEqual(["~/components/y", "./z"]);
  });
});
