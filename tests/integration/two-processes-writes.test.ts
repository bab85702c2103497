import type { Client, Transaction } from "@libsql/client";
import { eq, sql } from "drizzle-orm";
import { DrizzleQueryError } from "drizzle-orm/errors";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { openDb, registerBusy, RegisterBusyError, runsAsWrite, type Db } from "@/db";
import { limitHits } from "@/db/schema";

// Two clients on one database file, each with its own connections, stand for two server
// processes: SQLite's locks are taken per connection, whichever process holds it.
const url = () => process.env.DATABASE_URL!;

let a: { client: Client; db: Db };
let b: { client: Client; db: Db };
beforeAll(() => {
  a = openDb(url());
  b = openDb(url());
});
afterAll(() => {
  a.client.close();
  b.client.close();
});

/** Ticks a 10 ms timer while `work` runs and reports the worst lateness of a tick, in ms. */
async function worstTimerLag<T>(work: () => Promise<T>): Promise<{ result: PromiseSettledResult<T>; worstLagMs: number }> {
  let worst = 0;
  let last = performance.now();
  const timer = setInterval(() => {
    const at = performance.now();
    worst = Math.max(worst, at - last - 10);
    last = at;
  }, 10);
  try {
    const [result] = await Promise.allSettled([work()]);
    return { result: result!, worstLagMs: worst };
  } finally {
    clearInterval(timer);
  }
}

const hitsOf = (db: Db, key: string) => db.select({ attempt: limitHits.attempt }).from(limitHits).where(eq(limitHits.key, key));
const hit = (key: string, attempt: string) => ({ key, attempt, state: "counted" as const, at: new Date() });

/** Holds the write lock from client A (as another process would) until `release` is called. */
async function holdWriteLock(): Promise<{ tx: Transaction; release: (commit: boolean) => Promise<void> }> {
  const tx = await a.client.transaction("write");
  return { tx, release: (commit) => (commit ? tx.commit() : tx.rollback()) };
}

describe("a write waits for another process's write on timers, not in SQLite's busy loop", () => {
  test("the database is in WAL mode, so readers are never held by a writer", async () => {
    const [row] = await a.db.all<{ journal_mode: string }>(sql`PRAGMA journal_mode`);
    expect(row?.journal_mode).toBe("wal");
  });

  test("a transaction waits while the other holds BEGIN IMMEDIATE, the event loop keeps ticking, then it commits", async () => {
    const key = "two-processes:transaction";
    const held = await holdWriteLock();
    await held.tx.execute({ sql: "INSERT INTO limit_hits (attempt, key, state, at) VALUES (?, ?, 'counted', ?)", args: ["first", key, Date.now()] });
    let secondDone = false;
    const releaseAt = 1500;
    setTimeout(() => void held.release(true), releaseAt);
    const started = performance.now();
    const { result, worstLagMs } = await worstTimerLag(async () => {
      await b.db.transaction(async (tx) => {
        await tx.insert(limitHits).values(hit(key, "second"));
      });
      secondDone = true;
      return performance.now() - started;
    });
    expect(result.status).toBe("fulfilled");
    expect(secondDone).toBe(true);
    // It finished only after the first let go…
    expect((result as PromiseFulfilledResult<number>).value).toBeGreaterThanOrEqual(releaseAt - 50);
    // …and meanwhile a 10 ms timer was never late by more than 200 ms (the old 5 s busy wait held it for 1.5 s).
    expect(worstLagMs).toBeLessThan(200);
    expect((await hitsOf(a.db, key)).map((r) => r.attempt).sort()).toEqual(["first", "second"]);
  });

  test("a single write outside a transaction waits the same way", async () => {
    const key = "two-processes:autocommit";
    const held = await holdWriteLock();
    setTimeout(() => void held.release(false), 800);
    const { result, worstLagMs } = await worstTimerLag(() => b.db.insert(limitHits).values(hit(key, "lone")));
    expect(result.status).toBe("fulfilled");
    expect(worstLagMs).toBeLessThan(200);
    expect((await hitsOf(b.db, key)).map((r) => r.attempt)).toEqual(["lone"]);
  });

  test("reads go on at once while the other process writes (WAL)", async () => {
    const held = await holdWriteLock();
    try {
      const t0 = performance.now();
      await hitsOf(b.db, "two-processes:transaction");
      expect(performance.now() - t0).toBeLessThan(500);
    } finally {
      await held.release(false);
    }
  });

  test.each([
    ["a transaction", (db: Db, key: string) => db.transaction((tx) => tx.insert(limitHits).values(hit(key, "late")))],
    ["a single statement", (db: Db, key: string) => db.insert(limitHits).values(hit(key, "late"))],
  ])("past the deadline, %s is refused as busy (503, clear words) and writes nothing", async (_what, write) => {
    const key = `two-processes:deadline:${_what}`;
    const short = openDb(url(), { waitMs: 300 });
    const held = await holdWriteLock();
    try {
      const { result, worstLagMs } = await worstTimerLag(() => write(short.db, key));
      expect(result.status).toBe("rejected");
      const busy = registerBusy((result as PromiseRejectedResult).reason);
      expect(busy).toBeInstanceOf(RegisterBusyError);
      expect(busy?.status).toBe(503);
      expect(busy?.message).toMatch(/busy.*nothing was saved/i);
      expect(worstLagMs).toBeLessThan(200);
      await held.release(false);
      expect(await hitsOf(a.db, key)).toEqual([]);
      // The refused tries left nothing "in progress" on the client's connections: it commits now.
      await short.db.transaction((tx) => tx.insert(limitHits).values(hit(key, "after")));
      await short.db.insert(limitHits).values(hit(key, "after, alone"));
      expect((await hitsOf(a.db, key)).map((r) => r.attempt).sort()).toEqual(["after", "after, alone"]);
    } finally {
      if (!held.tx.closed) await held.release(false);
      short.client.close();
    }
  });
});

describe("registerBusy reads the busy answer through the wrappers around it", () => {
  const sqliteBusy = Object.assign(new Error("SQLITE_BUSY: database is locked"), { code: "SQLITE_BUSY" });
  const snapshot = Object.assign(new Error("SQLITE_BUSY_SNAPSHOT"), { code: "SQLITE_BUSY_SNAPSHOT" });
  test.each([
    // The shapes come from drizzle-orm 0.45 (DrizzleQueryError keeps the driver's error as cause)
    // and @libsql/client 0.18 (LibsqlError.code is the base code's name).
    ["a bare driver error", sqliteBusy, true],
    ["an extended busy code", snapshot, true],
    ["inside Drizzle's query error", new DrizzleQueryError("insert …", [], sqliteBusy), true],
    ["our own busy error inside Drizzle's", new DrizzleQueryError("insert …", [], new RegisterBusyError()), true],
    ["a constraint failure", Object.assign(new Error("UNIQUE constraint failed"), { code: "SQLITE_CONSTRAINT" }), false],
    ["a plain error", new Error("boom"), false],
  ])("%s", (_what, error, busy) => {
    expect(registerBusy(error) !== null).toBe(busy);
  });
});

describe("which lone statements take the write lock in a transaction of their own", () => {
  // The statements' shapes are Drizzle 0.45's (its SQL as logged) and this code base's raw SQL.
  test.each([
    ['insert into "limit_hits" ("attempt") values (?)', true],
    ['update "sessions" set "expires_at" = ? where "id" = ?', true],
    ['delete from "limit_hits" where "at" < ?', true],
    ["WITH old AS (SELECT id FROM limit_hits) DELETE FROM limit_hits WHERE id IN (SELECT id FROM old)", true],
    ["CREATE TABLE scratch (x)", true],
    ['select "id" from "items" where "identity" = ?', false],
    ["WITH RECURSIVE up(id) AS (SELECT ? UNION SELECT parent_id FROM links JOIN up ON child_id = up.id) SELECT id FROM up", false],
    ["PRAGMA journal_mode", false],
    ["VACUUM INTO ?", false],
  ])("%s → %s", (statement, write) => {
    expect(runsAsWrite(statement)).toBe(write);
  });
});

describe("an explicit transaction through execute() is refused, and nothing runs", () => {
  // Sent that way, BEGIN would open a transaction on one pooled connection that the next statement
  // need not use; a lone write takes a transaction of its own anyway.
  test.each(["BEGIN IMMEDIATE", "  begin", "COMMIT", "END", "ROLLBACK", "SAVEPOINT s1", "RELEASE s1"])("%s", async (statement) => {
    await expect(a.client.execute(statement)).rejects.toThrow(/through execute\(\) is refused: use client\.transaction\(\) or db\.transaction\(\)/);
  });

  test("the client goes on working: a write and a transaction after the refusal", async () => {
    await expect(a.client.execute("BEGIN")).rejects.toThrow(/refused/);
    await a.db.insert(limitHits).values(hit("explicit-begin", "one"));
    await a.db.transaction((tx) => tx.insert(limitHits).values(hit("explicit-begin", "two")));
    expect((await hitsOf(b.db, "explicit-begin")).map((h) => h.attempt).sort()).toEqual(["one", "two"]);
  });
});
