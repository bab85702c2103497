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

export function openDb(url = databaseUrl()): { client: Client; db: Db } {
  const client = openClient(url);
  return { client, db: drizzle(client, { schema }) };
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
