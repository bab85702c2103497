import "server-only";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { CHAIN_COLUMNS, CHAINED_COLUMNS, eventHash, GENESIS_HASH, isHash, type StoredEvent } from "./chain";
import { readEvents, type RawEvent } from "./rows";
import { MIGRATIONS_DIR, triggerProblems, type TriggerProblem } from "./triggers";

export type ChainProblemKind = "unhashed" | "missing" | "link" | "content" | "tail" | "counter";

export interface ChainProblem {
  kind: ChainProblemKind;
  /** The event where the chain breaks (for "tail" and "counter", the newest one left). */
  eventId: number | null;
  /** That event as it now reads, when it is there to read. */
  at: Date | null;
  type: string | null;
  message: string;
}

/** A head recorded elsewhere (a backup's manifest): the log must still hold it, unchanged. */
export interface ChainAnchor {
  id: number;
  hash: string;
  /** Where it was recorded, in words: "the backup of 5 Dec 2026, 07:36". */
  source: string;
}

export interface AuditReport {
  intact: boolean;
  events: number;
  head: { id: number; at: Date | null; hash: string | null } | null;
  /** The first place the chain breaks, in log order. */
  firstBreak: ChainProblem | null;
  /** How many more places break after it. */
  moreBreaks: number;
  triggers: TriggerProblem[];
  /** Set when the event log's columns are not the ones the chain covers. */
  columns: string | null;
  anchor: (ChainAnchor & { holds: boolean; message: string }) | null;
}

const asDate = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? new Date(v) : null);
const asText = (v: unknown) => (typeof v === "string" ? v : null);

function problem(kind: ChainProblemKind, row: RawEvent | null, message: string): ChainProblem {
  return { kind, eventId: row ? Number(row.id) : null, at: row ? asDate(row.at) : null, type: row ? asText(row.type) : null, message };
}

/** What is wrong where `row` follows `prev` (null for the first event), or null when nothing is. */
function checkLink(prev: RawEvent | null, row: RawEvent): ChainProblem | null {
  const id = Number(row.id);
  if (!isHash(row.hash) || !isHash(row.prevHash)) return problem("unhashed", row, `Event ${id} has no fingerprint: it was added behind the register's back.`);
  if (prev === null && id !== 1) {
    return problem("missing", row, id === 2 ? "Event 1 is missing: it was removed from the log." : `Events 1 to ${id - 1} are missing: they were removed from the log.`);
  }
  if (prev !== null && id !== Number(prev.id) + 1) {
    const from = Number(prev.id) + 1;
    const to = id - 1;
    return problem("missing", row, from === to ? `Event ${from} is missing: it was removed from the log.` : `Events ${from} to ${to} are missing: they were removed from the log.`);
  }
  const expectedPrev = prev === null ? GENESIS_HASH : prev.hash;
  if (row.prevHash !== expectedPrev) {
    return problem(
      "link",
      row,
      prev === null
        ? `Event ${id} does not start the chain: it names an earlier event that was never in the log, so it was rewritten.`
        : `The chain breaks between event ${prev.id} and event ${id}: event ${prev.id} was rewritten along with its fingerprint, or events were removed or moved here.`,
    );
  }
  if (eventHash(row as unknown as StoredEvent, row.prevHash) !== row.hash) {
    return problem("content", row, `Event ${id} was changed after it was written: its content no longer matches its fingerprint.`);
  }
  return null;
}

/**
 * Walks the whole event log and reports "intact" or the first broken link, with the triggers that
 * protect the register and, when given, a head recorded elsewhere. Reads only.
 */
export async function verifyAuditTrail(db: DbOrTx, opts: { anchor?: ChainAnchor | null; migrationsFolder?: string } = {}): Promise<AuditReport> {
  // The counter first: events appended while the walk runs only raise the newest id it then sees.
  const [counter] = await db.all<{ seq: number | null }>(sql`SELECT (SELECT seq FROM sqlite_sequence WHERE name = 'events') AS seq`);
  const seq = counter?.seq == null ? 0 : Number(counter.seq);

  const columns = (await db.all<{ name: string }>(sql`SELECT name FROM pragma_table_info('events')`)).map((c) => c.name);
  const covered: readonly string[] = [...CHAINED_COLUMNS, ...CHAIN_COLUMNS];
  const added = columns.filter((c) => !covered.includes(c));
  const gone = covered.filter((c) => !columns.includes(c));
  const columnProblem =
    added.length || gone.length
      ? `The event log's columns have changed (${[added.length ? `added: ${added.join(", ")}` : "", gone.length ? `gone: ${gone.join(", ")}` : ""].filter(Boolean).join("; ")}), so its chain no longer covers every column.`
      : null;

  let prev: RawEvent | null = null;
  let count = 0;
  let firstBreak: ChainProblem | null = null;
  let moreBreaks = 0;
  let anchorRow: RawEvent | null = null;
  const note = (p: ChainProblem | null) => {
    if (!p) return;
    if (firstBreak) moreBreaks++;
    else firstBreak = p;
  };
  if (!columnProblem) {
    for await (const page of readEvents(db)) {
      for (const row of page) {
        note(checkLink(prev, row));
        if (opts.anchor && Number(row.id) === opts.anchor.id) anchorRow = row;
        prev = row;
        count++;
      }
    }
    const newest = prev ? Number((prev as RawEvent).id) : 0;
    if (seq > newest) {
      note(problem("tail", prev, newest ? `The newest events are missing: the log had reached event ${seq} and now ends at event ${newest}.` : `Every event is missing: the log had reached event ${seq} and is now empty.`));
    } else if (seq < newest) {
      note(problem("counter", prev, `The event counter was set back: it stands at ${seq}, below the newest event, ${newest}.`));
    }
  }

  const anchor = opts.anchor
    ? anchorRow && anchorRow.hash === opts.anchor.hash
      ? { ...opts.anchor, holds: true, message: `The log still holds event ${opts.anchor.id}, the newest in ${opts.anchor.source}, unchanged.` }
      : { ...opts.anchor, holds: false, message: `Event ${opts.anchor.id}, the newest in ${opts.anchor.source}, is not in the log as it was then: the log was rewritten since, or restored from an older copy.` }
    : null;

  const triggers = await triggerProblems(db, opts.migrationsFolder ?? MIGRATIONS_DIR());
  const last = prev as RawEvent | null;
  return {
    intact: !firstBreak && !columnProblem && triggers.length === 0 && (anchor?.holds ?? true),
    events: count,
    head: last ? { id: Number(last.id), at: asDate(last.at), hash: asText(last.hash) } : null,
    firstBreak,
    moreBreaks,
    triggers,
    columns: columnProblem,
    anchor,
  };
}
