import "server-only";
import { sql } from "drizzle-orm";
import type { Db } from "@/db";
import { eventHash, GENESIS_HASH, type StoredEvent } from "./chain";
import { readEvents } from "./rows";

/**
 * Builds the chain for an event log that predates it (the migration that added the hash columns
 * leaves them empty). Runs from `migrateDatabase`, once: only while no event has a hash yet. An
 * unhashed event after a chained one is never chained here, since that would launder an event
 * written behind the app's back; `npm run audit:verify` reports it instead. One transaction: the
 * update triggers on events step aside for it and are put back exactly as they were.
 */
export async function chainExistingEvents(db: Db): Promise<number> {
  return db.transaction(async (tx) => {
    const [head] = await tx.all<{ hash: string | null }>(sql`SELECT hash FROM events ORDER BY id DESC LIMIT 1`);
    if (!head || head.hash !== null) return 0;
    const [some] = await tx.all<{ hashed: number }>(sql`SELECT EXISTS (SELECT 1 FROM events WHERE hash IS NOT NULL) AS hashed`);
    if (some?.hashed) return 0;

    const guards = await tx.all<{ name: string; sql: string }>(sql`
      SELECT name, sql FROM sqlite_master WHERE type = 'trigger' AND tbl_name = 'events' AND sql LIKE '%UPDATE%' ORDER BY name`);
    for (const g of guards) await tx.run(sql.raw(`DROP TRIGGER "${g.name.replace(/"/g, '""')}"`));
    let prevHash = GENESIS_HASH;
    let count = 0;
    for await (const page of readEvents(tx)) {
      for (const row of page) {
        const hash = eventHash(row as StoredEvent, prevHash);
        await tx.run(sql`UPDATE events SET prev_hash = ${prevHash}, hash = ${hash} WHERE id = ${row.id}`);
        prevHash = hash;
        count++;
      }
    }
    for (const g of guards) await tx.run(sql.raw(g.sql));
    return count;
  });
}
