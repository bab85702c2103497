import { AsyncLocalStorage } from "node:async_hooks";
import { mkdirSync } from "node:fs";
import { dirname, resolve } from "node:path";
import { createClient, type Client } from "@libsql/client";
import { drizzle, type LibSQLDatabase } from "drizzle-orm/libsql";
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
 * Opens a libSQL client. For a local file the folder is created first (createClient throws
 * otherwise). Foreign keys are on by default in libSQL's local driver; the busy wait is the
 * client's `timeout` option because a PRAGMA would reach one pooled connection only.
 * WAL is a property of the file and is set once, by the migration script.
 */
export function openClient(url = databaseUrl()): Client {
  if (url.startsWith("file:")) {
    const path = url.slice("file:".length).split("?")[0] ?? "";
    if (path && path !== ":memory:") mkdirSync(dirname(resolve(/*turbopackIgnore: true*/ path)), { recursive: true });
  }
  return createClient({ url, authToken: process.env.DATABASE_AUTH_TOKEN || undefined, timeout: 5000 });
}

/**
 * SQLite's busy wait is synchronous: if one request's transaction is open (waiting on an await)
 * and another request in the same process starts writing on a second pooled connection, the
 * second blocks the event loop, the first can never finish, and both stall until the timeout.
 * So writes in one process take turns through this lock; between processes the busy timeout
 * does the waiting. Re-entering from inside the lock runs at once.
 */
const lockHeld = new AsyncLocalStorage<boolean>();
let lockTail: Promise<unknown> = Promise.resolve();

export function withWriteLock<T>(fn: () => Promise<T>): Promise<T> {
  if (lockHeld.getStore()) return fn();
  const run = lockTail.then(() => lockHeld.run(true, fn));
  lockTail = run.catch(() => undefined);
  return run;
}

export function openDb(url = databaseUrl()): { client: Client; db: Db } {
  const client = openClient(url);
  const db = drizzle(client, { schema });
  const transaction = db.transaction.bind(db);
  db.transaction = ((fn, config) => withWriteLock(() => transaction(fn, config))) as Db["transaction"];
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
