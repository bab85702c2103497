import { resolve } from "node:path";
import { migrate } from "drizzle-orm/libsql/migrator";
import { chainExistingEvents } from "../lib/audit/backfill";
import { fillBandLevels } from "../lib/lab/response-bands";
import { databaseUrl, openDb } from "./index";

export const MIGRATIONS_FOLDER = resolve(process.cwd(), "db/migrations");

/**
 * Applies the committed migrations. Used by `npm run db:migrate`, the demo and the tests alike.
 * Sets WAL once (it is a property of the file) and checks foreign keys afterwards, because
 * Drizzle's migrator turns them off while it runs. Events recorded before the audit chain existed
 * are chained here (SQL alone cannot compute SHA-256), right after the migration that added it;
 * likewise drive units' responses recorded before their band levels were kept get them here.
 */
export async function migrateDatabase(url = databaseUrl()): Promise<void> {
  const { client, db } = openDb(url);
  try {
    if (url.startsWith("file:")) await client.execute("PRAGMA journal_mode = WAL");
    await migrate(db, { migrationsFolder: MIGRATIONS_FOLDER });
    await chainExistingEvents(db);
    await fillBandLevels(db);
    const broken = await client.execute("PRAGMA foreign_key_check");
    if (broken.rows.length > 0) {
      throw new Error(`foreign key check failed after migrating: ${JSON.stringify(broken.rows.slice(0, 5))}`);
    }
  } finally {
    client.close();
  }
}
