// The static checks of `npm test`: the type check and the linter. Each counts as one test in the
// closing line `.ci/run` prints (a report in .tmp/test-results, like vitest's), and either failing
// stops the run with its output shown.
import { spawn } from "node:child_process";
import { mkdirSync, writeFileSync } from "node:fs";

const checks = [
  { name: "typecheck (tsc --noEmit)", cmd: "npm", args: ["run", "--silent", "typecheck"] },
  { name: "lint (eslint, no warnings)", cmd: "npm", args: ["run", "--silent", "lint"] },
];

// Both at once: each is mostly one core's work, and the machine may have two. Each one's output is
// kept and shown after it, so the two never interleave.
const results = await Promise.all(
  checks.map(
    (c) =>
      new Promise((resolve) => {
        const started = Date.now();
        const run = spawn(c.cmd, c.args, { stdio: ["ignore", "pipe", "pipe"] });
        let output = "";
        run.stdout.on("data", (d) => (output += d));
        run.stderr.on("data", (d) => (output += d));
        run.on("close", (code) => {
          const ok = code === 0;
          if (output.trim()) process.stdout.write(output.endsWith("\n") ? output : `${output}\n`);
          console.log(`${ok ? "✓" : "✗"} ${c.name} (${((Date.now() - started) / 1000).toFixed(1)} s)`);
          resolve({ ...c, ok });
        });
      }),
  ),
);

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
