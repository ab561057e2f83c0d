#!/usr/bin/env -S node --max-semi-space-size=2 --no-concurrent-recompilation
/**
 * The `twistlog` command (package.json "bin"): runs the compiled CLI, build/cli/twistlog.mjs
 * (scripts/build-cli.mjs; `npm ci` and `npm run build` make it). Same flags and output as
 * `npm run analyse -- FILE` (app/lib/signal/cli.ts):
 *
 *   twistlog analyse FILE [flags]      or      twistlog FILE [flags]
 *
 * The #! line gives node 2 MB semi-spaces instead of 16 MB: the windowed analysis allocates
 * many short-lived windows, and the larger young generation only held about 26 MB more resident
 * memory, at no gain in time. It also has V8 optimise hot code on the thread that runs it
 * (--no-concurrent-recompilation): the command keeps both cores busy with its two threads, so a
 * background compiler thread waited for a core while the code ran unoptimised, and the analysis
 * of the bench log took about 12 % longer and 18 % more CPU (docs/performance.md, goal 2).
 * `node bin/twistlog.mjs` runs without these flags.
 */
import { existsSync } from "node:fs";
import { fileURLToPath } from "node:url";

const bundle = new URL("../build/cli/twistlog.mjs", import.meta.url);
if (!existsSync(fileURLToPath(bundle))) {
  process.stderr.write(
    "twistlog: the compiled command is missing (build/cli/twistlog.mjs); run npm run build:cli\n",
  );
  process.exit(1);
}
const { runCommand } = await import(bundle.href);
const argv = process.argv.slice(2);
// "analyse" names the one command; a log file called "analyse" is read as ./analyse.
runCommand(argv[0] === "analyse" ? argv.slice(1) : argv);
