// Runs the browser tests in lanes side by side: one production build and one seeded demo, then one
// vitest run per lane over its share of the files, each with its own server, copy of the database,
// mailbox and clock (its own tests/e2e/global-setup.ts run). Files are dealt longest first to the lane with the least work,
// by the rough durations in tests/e2e/durations.json (seconds; a file not listed counts 20 s).
// Lines are prefixed with the lane; each lane writes its own JSON report for
// scripts/test-summary.mjs. E2E_LANES sets the number (default 2). Arguments (file filters) are
// passed to one plain run instead.
import { spawn } from "node:child_process";
import { mkdirSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { createInterface } from "node:readline";
import { join, resolve } from "node:path";

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

// The build and the demo's seeding run side by side; each lane then starts from a copy of the seed.
const seedDir = resolve(".tmp/e2e-seed");
const seededDb = join(seedDir, "demo.db");
rmSync(seedDir, { recursive: true, force: true });
mkdirSync(seedDir, { recursive: true });
console.log("e2e: building the app and seeding the demo once for every lane");
const [built, seeded] = await Promise.all([
  process.env.E2E_SKIP_BUILD === "1" ? 0 : run(bin("next"), ["build"], { NODE_ENV: "production", TWINLEAF_BUILD_SKIP_TYPECHECK: "1" }),
  run(bin("tsx"), ["--import", "./scripts/server-only.mjs", "scripts/seed.ts"], { DATABASE_URL: `file:${seededDb}` }, "[seed]"),
]);
if (built !== 0 || seeded !== 0) {
  console.error(built !== 0 ? `e2e: next build failed with status ${built}` : `e2e: seeding the demo failed with status ${seeded}`);
  process.exit(built || seeded);
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
      { E2E_SKIP_BUILD: "1", E2E_SEEDED_DB: seededDb },
      lanes > 1 ? `[e2e ${i + 1}/${lanes}]` : undefined,
    ),
  ),
);
process.exit(codes.find((c) => c !== 0) ?? 0);
