// The audit chain over the event log (21 CFR Part 11 §11.10(e), EU GMP Annex 11 §9: an audit trail
// whose changes cannot obscure earlier records). Each event's hash is SHA-256 over a canonical
// serialisation of every column of the event and the previous event's hash, so changing, removing,
// inserting or moving an event breaks the chain at that point. Pure: no database, no Next.js.
import { createHash } from "node:crypto";

/** The "previous hash" of the first event. */
export const GENESIS_HASH = "0".repeat(64);

/** Names the serialisation, so a later change of it can never be mistaken for this one. */
export const CHAIN_FORMAT = "twinleaf-event-v1";

/** Every column of `events` in the order the serialisation takes them, then the chain's own two. */
export const CHAINED_COLUMNS = ["id", "at", "actor_id", "station", "type", "subject_kind", "subject_id", "data", "reason", "corrects_id"] as const;
export const CHAIN_COLUMNS = ["prev_hash", "hash"] as const;

/** One event as stored: `at` in ms, `data` the JSON text exactly as written to the column. */
export interface StoredEvent {
  id: number;
  at: number;
  actorId: string | null;
  station: string;
  type: string;
  subjectKind: string;
  subjectId: string;
  data: string;
  reason: string | null;
  correctsId: number | null;
}

/**
 * The canonical serialisation: a JSON array of the format name, the previous hash and every column
 * in CHAINED_COLUMNS order. JSON keeps a number apart from a string and null apart from "", and its
 * output for these values is fixed, so the same row always serialises to the same bytes.
 */
export function canonicalEvent(event: StoredEvent, prevHash: string): string {
  return JSON.stringify([
    CHAIN_FORMAT,
    prevHash,
    event.id,
    event.at,
    event.actorId,
    event.station,
    event.type,
    event.subjectKind,
    event.subjectId,
    event.data,
    event.reason,
    event.correctsId,
  ]);
}

export function sha256Hex(text: string | Uint8Array): string {
  return createHash("sha256").update(text).digest("hex");
}

/** The hash an event carries, given the hash of the event before it. */
export function eventHash(event: StoredEvent, prevHash: string): string {
  return sha256Hex(canonicalEvent(event, prevHash));
}

export const isHash = (s: unknown): s is string => typeof s === "string" && /^[0-9a-f]{64}$/.test(s);
