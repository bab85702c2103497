/**
 * Processes benchmark: writes through one and through two processes on one WAL database file, and
 * how late a 10 ms timer runs in each while they wait for each other's write lock. Compares the
 * client as it is (a 20 ms SQLite busy wait, the rest on timers: db/index.ts `whenFree`) with the
 * client as it was (SQLite's own 5 s busy wait, which sleeps inside the native call).
 * Run with `npm run bench:processes`; never part of `npm test`. The last line is one JSON object.
 *
 * Each process runs four request-like loops at once (as four requests would), each write a short
 * transaction that inserts a row, reads a count and waits on one await between the two.
 *
 *   --seconds N   how long each run lasts (default 5)
 */
import { spawn } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { monitorEventLoopDelay, performance } from "node:perf_hooks";
import { createInterface } from "node:readline";
import { fileURLToPath } from "node:url";
import { createClient } from "@libsql/client";
import { eq, sql } from "drizzle-orm";
import { drizzle } from "drizzle-orm/libsql";
import { openDb, registerBusy, withWriteLock, type Db } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import * as schema from "@/db/schema";

type Variant = "timers" | "sqlite-busy-wait";
interface ChildResult {
  writes: number;
  busy: number;
  failed: number;
  worstTimerLagMs: number;
  loopDelayP99Ms: number;
  loopDelayMaxMs: number;
}

const LOOPS_PER_PROCESS = 4;

function dbFor(url: string, variant: Variant): Db {
  if (variant === "timers") return openDb(url).db;
  // The client as it was before: SQLite's busy wait of 5 s, the process's lock around transactions.
  const db = drizzle(createClient({ url, timeout: 5000 }), { schema });
  const transaction = db.transaction.bind(db);
  db.transaction = ((fn, config) => withWriteLock(() => transaction(fn, config))) as Db["transaction"];
  return db;
}

async function child(url: string, variant: Variant, ms: number, name: string) {
  const db = dbFor(url, variant);
  const out: ChildResult = { writes: 0, busy: 0, failed: 0, worstTimerLagMs: 0, loopDelayP99Ms: 0, loopDelayMaxMs: 0 };
  const delay = monitorEventLoopDelay({ resolution: 5 });
  delay.enable();
  let last = performance.now();
  const timer = setInterval(() => {
    const at = performance.now();
    out.worstTimerLagMs = Math.max(out.worstTimerLagMs, at - last - 10);
    last = at;
  }, 10);
  const until = Date.now() + ms;
  const key = `bench:${name}`;
  const loop = async (n: number) => {
    while (Date.now() < until) {
      // Requests arrive through I/O: without this turn of the event loop, the local driver's
      // calls (synchronous inside, answered as microtasks) would never let a timer run at all.
      await new Promise((r) => setImmediate(r));
      try {
        await db.transaction(async (tx) => {
          await tx.insert(schema.limitHits).values({ attempt: `${name}-${n}`, key, state: "counted", at: new Date() });
          await tx.select({ n: sql<number>`count(*)` }).from(schema.limitHits).where(eq(schema.limitHits.key, key));
        });
        out.writes++;
      } catch (e) {
        if (registerBusy(e)) out.busy++;
        else out.failed++;
      }
    }
  };
  await Promise.all(Array.from({ length: LOOPS_PER_PROCESS }, (_, n) => loop(n)));
  clearInterval(timer);
  delay.disable();
  out.loopDelayP99Ms = delay.percentile(99) / 1e6;
  out.loopDelayMaxMs = delay.max / 1e6;
  process.stdout.write(`${JSON.stringify(out)}\n`);
  process.exit(0);
}

function runChild(url: string, variant: Variant, ms: number, name: string): Promise<ChildResult> {
  const script = fileURLToPath(import.meta.url);
  const proc = spawn(process.execPath, [...process.execArgv, script, "--child", url, variant, String(ms), name], { stdio: ["ignore", "pipe", "inherit"] });
  return new Promise((resolve, reject) => {
    let last = "";
    createInterface({ input: proc.stdout }).on("line", (l) => (last = l));
    proc.once("exit", (code) => (code === 0 ? resolve(JSON.parse(last) as ChildResult) : reject(new Error(`a child exited with ${code}`))));
  });
}

async function main() {
  const args = process.argv.slice(2);
  if (args[0] === "--child") return child(args[1]!, args[2] as Variant, Number(args[3]), args[4]!);
  const seconds = Number(args[args.indexOf("--seconds") + 1]) || 5;
  const dir = mkdtempSync(join(tmpdir(), "twinleaf-bench-processes-"));
  const cleanUp = () => rmSync(dir, { recursive: true, force: true });
  process.once("SIGINT", () => {
    cleanUp();
    process.exit(130);
  });
  try {
    const url = `file:${join(dir, "bench.db")}`;
    await migrateDatabase(url);
    console.log(`load average before: ${loadavg().map((l) => l.toFixed(1)).join(" ")}; ${seconds} s a run, ${LOOPS_PER_PROCESS} loops a process`);
    const summary: Record<string, { writes_per_s: number; busy: number; failed: number; worst_timer_lag_ms: number; loop_delay_max_ms: number }> = {};
    for (const variant of ["timers", "sqlite-busy-wait"] as Variant[]) {
      for (const processes of [1, 2]) {
        const results = await Promise.all(Array.from({ length: processes }, (_, p) => runChild(url, variant, seconds * 1000, `${variant}-${processes}-${p}`)));
        const writes = results.reduce((n, r) => n + r.writes, 0);
        const row = {
          writes_per_s: Math.round(writes / seconds),
          busy: results.reduce((n, r) => n + r.busy, 0),
          failed: results.reduce((n, r) => n + r.failed, 0),
          worst_timer_lag_ms: Math.round(Math.max(...results.map((r) => r.worstTimerLagMs))),
          loop_delay_max_ms: Math.round(Math.max(...results.map((r) => r.loopDelayMaxMs))),
        };
        summary[`${variant}_${processes}p`] = row;
        console.log(`${variant.padEnd(17)} ${processes} process${processes > 1 ? "es" : "  "}: ${String(row.writes_per_s).padStart(5)} writes/s, busy ${row.busy}, failed ${row.failed}, worst 10 ms timer late by ${row.worst_timer_lag_ms} ms, event-loop delay max ${row.loop_delay_max_ms} ms`);
      }
    }
    console.log(JSON.stringify(summary));
  } finally {
    cleanUp();
  }
}

await main();
