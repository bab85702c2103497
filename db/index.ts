import { AsyncLocalStorage } from "node:async_hooks";
import { mkdirSync } from "node:fs";
import { dirname, resolve } from "node:path";
import { createClient, type Client, type InArgs, type InStatement, type Transaction, type TransactionMode } from "@libsql/client";
import { drizzle, type LibSQLDatabase } from "drizzle-orm/libsql";
import { AppError } from "../lib/auth/errors";
import * as schema from "./schema";

export type Db = LibSQLDatabase<typeof schema>;
/** A Drizzle transaction handle; queries take `Db | Tx` so they run inside or outside one. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export type DbOrTx = Db | Tx;

export const DEFAULT_DATABASE_URL = "file:./data/twinleaf.db";

export function databaseUrl(): string {
  return process.env.DATABASE_URL || DEFAULT_DATABASE_URL;
}

/**
 * SQLite's own busy wait (the client's `timeout`) sleeps inside the native call and so holds the
 * whole event loop. It is kept short; the real waiting for another process's write is done by
 * `whenFree` below, between timers, so pages keep being served meanwhile.
 */
export const SQLITE_BUSY_WAIT_MS = 20;
/** How long a write waits in all for other processes' writes before it is answered "busy". */
export const WRITE_WAIT_MS = 10_000;

/** A write that could not start within WRITE_WAIT_MS. Nothing of it was applied. */
export class RegisterBusyError extends AppError {
  constructor(options?: { cause?: unknown }) {
    super(503, "The register is busy with other work and nothing was saved. Try again in a moment.");
    this.name = "RegisterBusyError";
    if (options?.cause !== undefined) this.cause = options.cause;
  }
}

function isSqliteBusy(e: unknown): boolean {
  const code = (e as { code?: unknown } | null)?.code;
  return typeof code === "string" && code.startsWith("SQLITE_BUSY");
}

/**
 * The busy answer hidden in an error, or null. Drizzle wraps driver errors (DrizzleQueryError,
 * with the driver's error as `cause`), so the chain is walked. A bare SQLITE_BUSY (from a libSQL
 * server, or one that escaped a transaction, which is then rolled back) becomes the same answer.
 */
export function registerBusy(e: unknown): RegisterBusyError | null {
  for (let cur: unknown = e, depth = 0; cur instanceof Error && depth < 10; cur = cur.cause, depth++) {
    if (cur instanceof RegisterBusyError) return cur;
    if (isSqliteBusy(cur)) return new RegisterBusyError({ cause: e });
  }
  return null;
}

export interface BusyWait {
  /** The overall deadline, in milliseconds. */
  waitMs: number;
  /** The longest pause between two tries, in milliseconds. */
  maxPauseMs: number;
}

const DEFAULT_WAIT: BusyWait = { waitMs: WRITE_WAIT_MS, maxPauseMs: 50 };

/**
 * Runs `op` again, after a pause on a timer, for as long as SQLite answers SQLITE_BUSY and the
 * deadline allows; then RegisterBusyError. Only for operations that SQLite guarantees applied
 * nothing when busy: BEGIN IMMEDIATE, a single autocommit statement, a batch (rolled back whole).
 */
export async function whenFree<T>(op: () => Promise<T>, wait: BusyWait = DEFAULT_WAIT): Promise<T> {
  const deadline = Date.now() + wait.waitMs;
  for (let tries = 0; ; tries++) {
    try {
      return await op();
    } catch (e) {
      if (!isSqliteBusy(e)) throw e;
      // Doubling pauses with jitter, so two waiting processes do not retry in step.
      const pause = Math.min(wait.maxPauseMs, 2 ** tries) * (0.5 + Math.random() / 2);
      if (Date.now() + pause > deadline) throw new RegisterBusyError({ cause: e });
      await new Promise((r) => setTimeout(r, pause));
    }
  }
}

// Statements that need no write transaction of their own (or, like VACUUM, may not run in one).
// A WITH is a read (the genealogy's recursive queries) unless a write follows its tables.
const OUTSIDE_TRANSACTION = /^\s*(?:select|pragma|explain|vacuum|values|begin|commit|end|rollback|savepoint|release|attach|detach)\b/i;
const WRITE_AFTER_WITH = /\b(?:insert\s+(?:or\s+\w+\s+)?into|replace\s+into|delete\s+from|update\s+(?:or\s+\w+\s+)?["`\w.]+\s+set)\b/i;
/** Whether a lone statement runs in a write transaction of its own (see `waitingOnBusy`). */
export const runsAsWrite = (sql: string): boolean => !(OUTSIDE_TRANSACTION.test(sql) || (/^\s*with\b/i.test(sql) && !WRITE_AFTER_WITH.test(sql)));

// BEGIN … COMMIT sent through `execute` would start a transaction on one pooled connection that the
// next statement may not use (and a lone write here takes a transaction of its own anyway).
const EXPLICIT_TRANSACTION = /^\s*(?:begin|commit|end|rollback|savepoint|release)\b/i;
const refuseExplicitTransaction = (sql: string): void => {
  if (EXPLICIT_TRANSACTION.test(sql)) {
    throw new Error(`"${sql.trim().split(/\s+/)[0]}" through execute() is refused: use client.transaction() or db.transaction(), or a plain libSQL client for one connection's script.`);
  }
};

/** One statement in the object form every entry point accepts. */
const statementOf = (stmt: InStatement, args?: InArgs): { sql: string; args?: InArgs } =>
  typeof stmt === "string" ? { sql: stmt, args: args ?? [] } : stmt;

/**
 * The client's entry points that start a write, made to wait with `whenFree`.
 *
 * For a local file the write lock is taken with `executeMultiple` (sqlite3_exec), never with a
 * prepared statement: a statement that stops on SQLITE_BUSY stays "in progress" until it is
 * garbage-collected, and every later COMMIT on its connection then fails ("SQL statements in
 * progress"). So a transaction starts DEFERRED (which takes no lock and cannot be busy) and is
 * turned into BEGIN IMMEDIATE inside exec, which finalises the statement when it fails; a lone
 * write runs in such a transaction of its own. A transaction's own statements are never retried:
 * once BEGIN IMMEDIATE has returned, this connection holds the write lock.
 *
 * A libSQL server waits for its own locks; there a busy answer to a lone statement or a batch
 * (which applied nothing) is retried the same way.
 */
function waitingOnBusy(client: Client, wait: BusyWait): Client {
  const execute = client.execute.bind(client);
  const batch = client.batch.bind(client);
  const transaction = client.transaction.bind(client);
  if (client.protocol !== "file") {
    client.execute = (async (stmt: InStatement, args?: InArgs) => {
      const one = statementOf(stmt, args);
      refuseExplicitTransaction(one.sql);
      return whenFree(() => execute(one), wait);
    }) as Client["execute"];
    client.batch = ((...args: Parameters<Client["batch"]>) => whenFree(() => batch(...args), wait)) as Client["batch"];
    return client;
  }

  const beginWrite = () =>
    whenFree(async () => {
      const tx = await transaction("deferred");
      try {
        await tx.executeMultiple("ROLLBACK; BEGIN IMMEDIATE");
        return tx;
      } catch (e) {
        tx.close();
        throw e;
      }
    }, wait);

  const inOwnTransaction = async <T>(fn: (tx: Transaction) => Promise<T>): Promise<T> => {
    const tx = await beginWrite();
    try {
      const out = await fn(tx);
      await tx.commit();
      return out;
    } finally {
      tx.close();
    }
  };

  client.transaction = ((mode?: TransactionMode) =>
    mode === undefined || mode === "write" ? beginWrite() : whenFree(() => transaction(mode), wait)) as Client["transaction"];
  client.execute = (async (stmt: InStatement, args?: InArgs) => {
    const one = statementOf(stmt, args);
    refuseExplicitTransaction(one.sql);
    return runsAsWrite(one.sql)
      ? withWriteLock(() => inOwnTransaction((tx) => tx.execute(one)))
      : whenFree(() => execute(one), wait);
  }) as Client["execute"];
  client.batch = ((stmts: Parameters<Client["batch"]>[0]) =>
    withWriteLock(() => inOwnTransaction((tx) => tx.batch(stmts.map((s) => (Array.isArray(s) ? statementOf(s[0], s[1]) : s)))))) as Client["batch"];
  return client;
}

/**
 * Opens a libSQL client. For a local file the folder is created first (createClient throws
 * otherwise). Foreign keys are on by default in libSQL's local driver; the busy wait is the
 * client's `timeout` option because a PRAGMA would reach one pooled connection only.
 * WAL is a property of the file and is set once, by the migration script.
 */
export function openClient(url = databaseUrl(), wait: Partial<BusyWait> = {}): Client {
  if (url.startsWith("file:")) {
    const path = url.slice("file:".length).split("?")[0] ?? "";
    if (path && path !== ":memory:") mkdirSync(dirname(resolve(/*turbopackIgnore: true*/ path)), { recursive: true });
  }
  const client = createClient({ url, authToken: process.env.DATABASE_AUTH_TOKEN || undefined, timeout: SQLITE_BUSY_WAIT_MS });
  return waitingOnBusy(client, { ...DEFAULT_WAIT, ...wait });
}

/**
 * Writes in one process take turns through this lock: a second request's write would otherwise
 * find the first one's transaction open on another pooled connection and wait on SQLITE_BUSY for
 * a lock its own process holds. Between processes `whenFree` does the waiting, on timers.
 * Re-entering from inside the lock runs at once.
 */
const lockHeld = new AsyncLocalStorage<boolean>();
let lockTail: Promise<unknown> = Promise.resolve();

export function withWriteLock<T>(fn: () => Promise<T>): Promise<T> {
  if (lockHeld.getStore()) return fn();
  const run = lockTail.then(() => lockHeld.run(true, fn));
  lockTail = run.catch(() => undefined);
  return run;
}

export function openDb(url = databaseUrl(), wait: Partial<BusyWait> = {}): { client: Client; db: Db } {
  const client = openClient(url, wait);
  const db = drizzle(client, { schema });
  const transaction = db.transaction.bind(db);
  // A busy answer that escapes (the deadline passed at BEGIN, or a libSQL server said busy) comes
  // out as RegisterBusyError, which the guards answer with 503 and its words.
  db.transaction = ((fn, config) =>
    withWriteLock(() => transaction(fn, config)).catch((e: unknown) => {
      throw registerBusy(e) ?? e;
    })) as Db["transaction"];
  return { client, db };
}

// One client per server process (kept across hot reloads in development).
const globalForDb = globalThis as unknown as { twinleafDb?: { client: Client; db: Db; url: string } };

export function getDb(): Db {
  const url = databaseUrl();
  if (!globalForDb.twinleafDb || globalForDb.twinleafDb.url !== url) {
    globalForDb.twinleafDb = { ...openDb(url), url };
  }
  return globalForDb.twinleafDb.db;
}

export { schema };
