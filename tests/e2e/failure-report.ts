import { afterEach } from "vitest";
import { openPagesReport } from "./browser";

// After a failed browser test, what each open page showed, in the test output: a CI log then
// says whether the page was still loading, showed an error, or showed something else. A test
// that passes on its retry (vitest.e2e.config.ts) is listed as passed: this line is where the
// failed attempt shows.
afterEach(async ({ task }) => {
  if (task.result?.state !== "fail") return;
  const attempt = (task.result.retryCount ?? 0) + 1;
  const report = await openPagesReport();
  console.error(`"${task.name}" failed on attempt ${attempt}. Open pages:\n${report || "none"}`);
});
