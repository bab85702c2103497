// The static checks of `npm test`: the type check and the linter. Each counts as one test in the
// closing line `.ci/run` prints (a report in .tmp/test-results, like vitest's), and either failing
// stops the run with its output shown.
import { spawnSync } from "node:child_process";
import { mkdirSync, writeFileSync } from "node:fs";

const checks = [
  { name: "typecheck (tsc --noEmit)", cmd: "npm", args: ["run", "--silent", "typecheck"] },
  { name: "lint (eslint, no warnings)", cmd: "npm", args: ["run", "--silent", "lint"] },
];

const results = checks.map((c) => {
  const started = Date.now();
  const run = spawnSync(c.cmd, c.args, { stdio: "inherit" });
  const ok = run.status === 0;
  console.log(`${ok ? "✓" : "✗"} ${c.name} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
  return { ...c, ok };
});

mkdirSync(".tmp/test-results", { recursive: true });
writeFileSync(
  ".tmp/test-results/static-checks.json",
  JSON.stringify({
    numPassedTests: results.filter((r) => r.ok).length,
    numFailedTests: results.filter((r) => !r.ok).length,
    testResults: results.map((r) => ({ name: r.name, status: r.ok ? "passed" : "failed", assertionResults: [{ title: r.name, status: r.ok ? "passed" : "failed" }] })),
  }),
);
process.exit(results.every((r) => r.ok) ? 0 : 1);
