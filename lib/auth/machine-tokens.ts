import "server-only";
import type { Station } from "@/lib/vocabulary/stations";
// Machine tokens: how a test bench in the lab reaches Twinleaf's JSON API without a person's
// session. The token is shown once, when it is made; only its SHA-256 is kept, so a copy of the
// database cannot be used to post readings. Rows are revoked once, never deleted (see the triggers).
import { randomBytes } from "node:crypto";
import { and, desc, eq, isNull, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/sqlite-core";
import type { Db, DbOrTx } from "@/db";
import { machineTokens, users } from "@/db/schema";
import { appendEvent } from "@/lib/events/queries";
import { formatDate } from "@/lib/format";
import { AppError } from "./errors";
import type { Permission } from "./permissions";
import type { AuthUser } from "./sessions";
import { hashToken, newId } from "./tokens";

export const MACHINE_SCOPES = ["lab"] as const;
export type MachineScope = (typeof MACHINE_SCOPES)[number];

/**
 * What a route may be guarded by and still let a token of the scope in. A route that declares
 * `machine: "lab"` with any other permission fails as it loads, so a token never reaches, say,
 * an admin endpoint by a slip in one route file.
 */
export const MACHINE_SCOPE_PERMISSIONS: Record<MachineScope, readonly Permission[]> = {
  lab: ["lab.work"],
};

/** Every token starts with this, so a leaked one is easy to recognise (and to search for). */
export const MACHINE_TOKEN_PREFIX = "tlm_";
/** 32 random bytes in base64url are 43 characters, without padding. */
const TOKEN_SHAPE = /^tlm_[A-Za-z0-9_-]{43}$/;
/** How much of the token (after "tlm_") the list shows, to tell tokens apart. */
const SHOWN_CHARACTERS = 8;

/**
 * Who is behind a machine request. Records a machine makes are written with `recorderFor`:
 * no actor (actorId null, as no person did it), station "lab-bench", and the token's id and name
 * in the event data, so the log still says which bench it was.
 */
export interface MachinePrincipal {
  kind: "machine";
  id: string;
  name: string;
  scope: MachineScope;
}

/** Exactly one of the two is set: a signed-in person, or a bench with a machine token. */
export type Principal = { user: AuthUser; machine: null } | { user: null; machine: MachinePrincipal };

export const MACHINE_STATION: Station = "lab-bench";

/**
 * The actor, station and extra event data for a record made by either kind of principal.
 * Spread it into appendEvent: `appendEvent(tx, { ...r.event, type, subjectKind, subjectId, data: { ...r.data, ...mine } })`.
 * `userStation` is the station a person at the same endpoint records at (e.g. "lab").
 */
export function recorderFor(principal: Principal, userStation: Station): { actorId: string | null; station: Station; data: Record<string, string> } {
  if (principal.machine) {
    return { actorId: null, station: MACHINE_STATION, data: { machineTokenId: principal.machine.id, machineTokenName: principal.machine.name } };
  }
  return { actorId: principal.user.id, station: userStation, data: {} };
}

/** The part of a token the list shows, e.g. "tlm_abcd1234…". */
export function displayPrefix(prefix: string): string {
  return `${MACHINE_TOKEN_PREFIX}${prefix}…`;
}

function cleanName(name: string): string {
  const trimmed = name.trim().replace(/\s+/g, " ");
  if (trimmed.length < 2 || trimmed.length > 80) {
    throw new AppError(400, "Give the token a name of 2 to 80 characters, such as the bench it is for.", { name: ["Use 2 to 80 characters."] });
  }
  return trimmed;
}

/**
 * Makes a token and returns it with its row. The token is in the return value only: it is never
 * written to the database, the event or a log, and cannot be shown again.
 */
export async function createMachineToken(
  db: Db,
  input: { name: string; scope: MachineScope; actorId: string },
): Promise<{ token: string; row: typeof machineTokens.$inferSelect }> {
  const name = cleanName(input.name);
  if (!MACHINE_SCOPES.includes(input.scope)) throw new AppError(400, "Machine tokens can only be made for the lab.");
  const token = MACHINE_TOKEN_PREFIX + randomBytes(32).toString("base64url");
  const prefix = token.slice(MACHINE_TOKEN_PREFIX.length, MACHINE_TOKEN_PREFIX.length + SHOWN_CHARACTERS);
  const id = newId();
  const row = await db.transaction(async (tx) => {
    // Two active tokens with one name could not be told apart when one must be revoked.
    const [same] = await tx
      .select({ id: machineTokens.id })
      .from(machineTokens)
      .where(and(eq(sql`lower(${machineTokens.name})`, name.toLowerCase()), isNull(machineTokens.revokedAt)))
      .limit(1);
    if (same) {
      throw new AppError(409, `An active token is already called "${name}": choose another name, or revoke that one first.`, {
        name: ["An active token already has this name."],
      });
    }
    const eventId = await appendEvent(tx, {
      actorId: input.actorId,
      station: "admin",
      type: "machine_token.created",
      subjectKind: "machine_token",
      subjectId: id,
      data: { name, prefix, scope: input.scope },
    });
    const [inserted] = await tx
      .insert(machineTokens)
      .values({ id, name, tokenHash: hashToken(token), prefix, scope: input.scope, createdBy: input.actorId, eventId })
      .returning();
    return inserted!;
  });
  return { token, row };
}

export interface MachineTokenSummary {
  id: string;
  name: string;
  prefix: string;
  scope: MachineScope;
  createdAt: Date;
  createdByName: string | null;
  revokedAt: Date | null;
  revokedByName: string | null;
}

const revoker = alias(users, "revoker");

/** Every token, newest first, with who made and who revoked it. Never the hash. */
export async function listMachineTokens(db: DbOrTx): Promise<MachineTokenSummary[]> {
  return db
    .select({
      id: machineTokens.id,
      name: machineTokens.name,
      prefix: machineTokens.prefix,
      scope: machineTokens.scope,
      createdAt: machineTokens.createdAt,
      createdByName: users.name,
      revokedAt: machineTokens.revokedAt,
      revokedByName: revoker.name,
    })
    .from(machineTokens)
    .leftJoin(users, eq(users.id, machineTokens.createdBy))
    .leftJoin(revoker, eq(revoker.id, machineTokens.revokedBy))
    .orderBy(desc(machineTokens.createdAt), desc(sql`${machineTokens}.rowid`));
}

/** Revokes a token at once: the next request with it is refused. A token is revoked once only. */
export async function revokeMachineToken(db: Db, input: { id: string; actorId: string; reason?: string | null }): Promise<{ name: string }> {
  return db.transaction(async (tx) => {
    const [row] = await tx.select().from(machineTokens).where(eq(machineTokens.id, input.id)).limit(1);
    if (!row) throw new AppError(404, "No such machine token.");
    if (row.revokedAt) throw new AppError(409, `The token "${row.name}" was already revoked on ${formatDate(row.revokedAt)}.`);
    const eventId = await appendEvent(tx, {
      actorId: input.actorId,
      station: "admin",
      type: "machine_token.revoked",
      subjectKind: "machine_token",
      subjectId: row.id,
      data: { name: row.name, prefix: row.prefix, scope: row.scope },
      reason: input.reason?.trim() || null,
    });
    await tx
      .update(machineTokens)
      .set({ revokedAt: sql`(unixepoch('subsec') * 1000)`, revokedBy: input.actorId, revokeEventId: eventId })
      .where(and(eq(machineTokens.id, row.id), isNull(machineTokens.revokedAt)));
    return { name: row.name };
  });
}

/**
 * The bench behind a token, or null for a malformed, unknown or revoked one. Takes the token
 * itself or a whole `Bearer …` header value. The lookup is on the unique hash, so no comparison
 * of secrets happens in code.
 */
export async function verifyMachineToken(db: DbOrTx, bearer: string): Promise<MachinePrincipal | null> {
  const token = bearer.trim().replace(/^Bearer\s+/i, "");
  if (!TOKEN_SHAPE.test(token)) return null;
  const [row] = await db
    .select({ id: machineTokens.id, name: machineTokens.name, scope: machineTokens.scope })
    .from(machineTokens)
    .where(and(eq(machineTokens.tokenHash, hashToken(token)), isNull(machineTokens.revokedAt)))
    .limit(1);
  return row ? { kind: "machine", ...row } : null;
}
