/**
 * Builds the compiled `twistlog` command: app/lib/signal/cli.ts and everything it imports,
 * bundled by esbuild into one ES module, build/cli/twistlog.mjs (git-ignored), so the command
 * starts without transpiling TypeScript. bin/twistlog.mjs runs it. Run by `npm ci` (prepare),
 * `npm run build` and `npm run build:cli`; it takes well under a second.
 */
import { fileURLToPath } from "node:url";

let build;
try {
  ({ build } = await import("esbuild"));
} catch {
  // An install without the devDependencies (npm ci --omit=dev) runs prepare too: say so, and
  // fail only when the build was asked for.
  process.stderr.write(
    "build-cli: esbuild is not installed (devDependencies left out?); the twistlog command was not built\n",
  );
  process.exit(process.env.npm_lifecycle_event === "prepare" ? 0 : 1);
}

const root = fileURLToPath(new URL("..", import.meta.url));

await build({
  absWorkingDir: root,
  // The block helper (the CLI's second thread) starts from a file beside it.
  entryPoints: {
    twistlog: "app/lib/signal/cli.ts",
    "block-worker": "app/lib/signal/block-worker.ts",
  },
  outdir: "build/cli",
  outExtension: { ".js": ".mjs" },
  bundle: true,
  format: "esm",
  platform: "node",
  target: "node20",
  sourcemap: "linked",
  // Less to read at start-up; names kept, so a --cpu-prof profile stays readable.
  minifyWhitespace: true,
  minifySyntax: true,
  logLevel: "warning",
  // CommonJS packages in the bundle (papaparse, fft.js) call require() for Node's own modules.
  banner: {
    js: 'import { createRequire as __twistlogRequire } from "node:module"; const require = __twistlogRequire(import.meta.url);',
  },
});
