// Prints the closing line CI reads, "N passed, N failed", from vitest's JSON reports.
import { existsSync, readdirSync, readFileSync } from "node:fs";
import { join } from "node:path";

const dir = ".tmp/test-results";
let passed = 0;
let failed = 0;
let skipped = 0;
for (const file of existsSync(dir) ? readdirSync(dir).filter((f) => f.endsWith(".json")) : []) {
  const report = JSON.parse(readFileSync(join(dir, file), "utf8"));
  passed += report.numPassedTests ?? 0;
  failed += report.numFailedTests ?? 0;
  skipped += (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0);
  // A suite that failed to load counts its file as a failure, so a crash is never a pass.
  failed += (report.testResults ?? []).filter((r) => r.status === "failed" && (r.assertionResults ?? []).length === 0).length;
}
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
