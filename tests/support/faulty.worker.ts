/**
 * A stand-in analysis worker for the fault tests (never used by the app): a drive log whose
 * first line is "# runaway" keeps allocating JS heap until the pool's real memory limit ends the
 * worker; "# throw" throws; any other file goes to the real worker (app/lib/analyses/analysis.worker.ts).
 */
import analyseStoredLog from "../../app/lib/analyses/analysis.worker.ts";
import type { AnalysisTask } from "../../app/lib/analyses/tasks";
import { blobStoreFrom } from "../../app/lib/infra/storage.server";

async function firstLine(task: AnalysisTask): Promise<string> {
  for await (const chunk of blobStoreFrom(task.store).read(task.blobKey)) {
    return String(chunk).split("\n", 1)[0]!;
  }
  return "";
}

export default async function faultyAnalysis(task: AnalysisTask) {
  const line = await firstLine(task);
  if (line === "# throw") throw new RangeError("injected: the pipeline threw on this file");
  if (line === "# runaway") {
    // Plain JS arrays live on the heap that maxOldGenerationSizeMb limits.
    const hoard: number[][] = [];
    for (;;) hoard.push(Array.from({ length: 100_000 }, (_, i) => i + hoard.length));
  }
  return analyseStoredLog(task);
}
