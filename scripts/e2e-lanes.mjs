// Runs the browser tests in lanes side by side: one production build, then one vitest run per
// lane over its share of the files, each with its own server, database, mailbox and clock (its own
// tests/e2e/global-setup.ts run). Files are dealt longest first to the lane with the least work,
// by the rough durations in tests/e2e/durations.json (seconds; a file not listed counts 20 s).
// Lines are prefixed with the lane; each lane writes its own JSON report for
// scripts/test-summary.mjs. E2E_LANES sets the number (default 2). Arguments (file filters) are
// passed to one plain run instead.
import { spawn } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import { createInterface } from "node:readline";
import { resolve } from "node:path";

const filters = process.argv.slice(2);
const lanes = filters.length ? 1 : Math.max(1, Number(process.env.E2E_LANES) || 2);
const bin = (name) => resolve("node_modules/.bin", name);

function run(cmd, args, env, prefix) {
  return new Promise((ok) => {
    const child = spawn(cmd, args, { env: { ...process.env, ...env }, stdio: ["ignore", prefix ? "pipe" : "inherit", prefix ? "pipe" : "inherit"] });
    if (prefix) {
      createInterface({ input: child.stdout }).on("line", (l) => process.stdout.write(`${prefix} ${l}\n`));
      createInterface({ input: child.stderr }).on("line", (l) => process.stderr.write(`${prefix} ${l}\n`));
    }
    child.once("error", (e) => {
      console.error(`${prefix ?? ""} could not start ${cmd}: ${e.message}`);
      ok(1);
    });
    child.once("exit", (code, signal) => ok(code ?? (signal ? 1 : 0)));
  });
}

if (process.env.E2E_SKIP_BUILD !== "1") {
  console.log("e2e: building the app once for every lane");
  const built = await run(bin("next"), ["build"], { NODE_ENV: "production", TWINLEAF_BUILD_SKIP_TYPECHECK: "1" });
  if (built !== 0) {
    console.error(`e2e: next build failed with status ${built}`);
    process.exit(built);
  }
}

const durations = JSON.parse(readFileSync("tests/e2e/durations.json", "utf8"));
const files = readdirSync("tests/e2e").filter((f) => f.endsWith(".e2e.test.ts"));
files.sort((a, b) => (durations[b] ?? 20) - (durations[a] ?? 20) || a.localeCompare(b));
const share = Array.from({ length: lanes }, () => ({ seconds: 0, files: [] }));
for (const f of files) {
  const lane = share.reduce((least, l) => (l.seconds < least.seconds ? l : least));
  lane.seconds += durations[f] ?? 20;
  lane.files.push(`tests/e2e/${f}`);
}

const codes = await Promise.all(
  share.map((lane, i) =>
    run(
      bin("vitest"),
      ["run", "--config", "vitest.e2e.config.ts", `--outputFile.json=.tmp/test-results/e2e-${i + 1}.json`, ...(filters.length ? filters : lane.files)],
      { E2E_SKIP_BUILD: "1" },
      lanes > 1 ? `[e2e ${i + 1}/${lanes}]` : undefined,
    ),
  ),
);
process.exit(codes.find((c) => c !== 0) ?? 0);
