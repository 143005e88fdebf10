// Prints the totals of every suite as one plain line, "N passed, N failed", for CI to count.
// A report that is missing (a suite that could not start) counts as one failure.
import { readFileSync } from "node:fs";

let passed = 0;
let failed = 0;
for (const file of process.argv.slice(2)) {
  let report;
  try {
    report = JSON.parse(readFileSync(file, "utf8"));
  } catch {
    console.error(`no report at ${file}: that suite did not run`);
    failed += 1;
    continue;
  }
  if (typeof report.numPassedTests === "number") {
    // vitest
    passed += report.numPassedTests;
    failed += report.numFailedTests + (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0);
    if (report.numTotalTestSuites > 0 && report.success === false && report.numFailedTests === 0) failed += 1;
  } else if (report.stats) {
    // Playwright: skipped tests count as failures (a skipped check is a defect)
    passed += report.stats.expected + report.stats.flaky;
    failed += report.stats.unexpected + report.stats.skipped;
    if (report.errors?.length) failed += report.errors.length;
  }
}
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed > 0 ? 1 : 0);
