import { sql } from "drizzle-orm";
import type { Db } from "@/db";

/**
 * Every row of every table (but those named in `except`): a refused call must leave the database
 * exactly as it was. Ordered by every column, which also works for WITHOUT ROWID tables (holdings).
 */
export async function snapshot(db: Db, except: readonly string[] = []): Promise<Record<string, unknown[]>> {
  const tables = await db.all<{ name: string }>(
    sql`SELECT name FROM sqlite_master WHERE type = 'table' AND name NOT LIKE 'sqlite_%' AND name NOT LIKE '__drizzle%' ORDER BY name`,
  );
  const out: Record<string, unknown[]> = {};
  for (const { name } of tables) {
    if (except.includes(name)) continue;
    const cols = await db.all<{ name: string }>(sql`SELECT name FROM pragma_table_info(${name})`);
    out[name] = await db.all(sql`SELECT * FROM ${sql.identifier(name)} ORDER BY ${sql.join(cols.map((c) => sql.identifier(c.name)), sql`, `)}`);
  }
  return out;
}
