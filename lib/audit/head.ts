import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { GENESIS_HASH } from "./chain";

export interface ChainHead {
  /** The newest event, or null before the first. */
  id: number | null;
  hash: string | null;
  /** The id the next event takes: one past the highest ever used (AUTOINCREMENT's own counter). */
  nextId: number;
  /** What the next event names as its previous hash. */
  prevHash: string;
}

export class ChainNotBuiltError extends Error {
  constructor() {
    super("The event log's audit chain has not been built for the events already recorded: run `npm run db:migrate`.");
    this.name = "ChainNotBuiltError";
  }
}

/**
 * The head of the chain. Read it inside the transaction that appends: the events_chain_linear
 * trigger holds the same rule (next id = the counter + 1, previous hash = the newest hash).
 */
export async function chainHead(db: DbOrTx): Promise<ChainHead> {
  const [row] = await db.all<{ head_id: number | null; head_hash: string | null; seq: number | null }>(sql`
    SELECT (SELECT id FROM events ORDER BY id DESC LIMIT 1) AS head_id,
           (SELECT hash FROM events ORDER BY id DESC LIMIT 1) AS head_hash,
           (SELECT seq FROM sqlite_sequence WHERE name = 'events') AS seq`);
  const id = row?.head_id ?? null;
  const hash = row?.head_hash ?? null;
  if (id !== null && hash === null) throw new ChainNotBuiltError();
  return { id, hash, nextId: Number(row?.seq ?? 0) + 1, prevHash: hash ?? GENESIS_HASH };
}
