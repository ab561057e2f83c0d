import { afterEach } from "vitest";
import { openPagesReport } from "./browser";

// After a failed browser test, what each open page showed, in the test output: a CI log then
// says whether the page was still loading, showed an error, or showed something else.
afterEach(async ({ task }) => {
  if (task.result?.state !== "fail") return;
  const report = await openPagesReport();
  if (report) console.error(`Open pages after "${task.name}" failed:\n${report}`);
});
