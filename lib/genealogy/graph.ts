import "server-only";
import type { Station } from "@/lib/vocabulary/stations";
import { and, eq, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, links, SHARED_KINDS, type Item, type ItemKind } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";
import { addHoldings, removeHoldings } from "./holdings";

export type { Item, ItemKind };

/** Who records a change and where; every change of the graph is an event. */
export interface Recorder {
  actorId: string | null;
  station: Station;
  /** When it happened: tests that build a graph by hand set it; left out, the register's clock (lib/clock.ts). */
  at?: Date;
  reason?: string | null;
}

export interface NewItem {
  kind: ItemKind;
  identity: string;
  state: string;
  modelId?: string | null;
  finishId?: string | null;
  partType?: string | null;
  dealerId?: string | null;
  attrs?: Record<string, unknown>;
}

/** Registers a thing with its identity, and the event that says so. Call inside a transaction. */
export async function createItem(tx: DbOrTx, item: NewItem, by: Recorder): Promise<Item> {
  const id = newId();
  // One reading of the clock for the item and its event.
  const at = by.at ?? now();
  const eventId = await appendEvent(tx, {
    actorId: by.actorId,
    station: by.station,
    type: "item.created",
    subjectKind: "item",
    subjectId: id,
    data: { identity: item.identity, kind: item.kind, state: item.state },
    reason: by.reason ?? null,
    at,
  });
  try {
    const [row] = await tx
      .insert(items)
      .values({ id, ...item, attrs: item.attrs ?? {}, createdEventId: eventId, createdAt: at })
      .returning();
    return row!;
  } catch (e) {
    if (isConstraintError(e, "UNIQUE")) throw new AppError(409, `${item.identity} is already registered.`);
    throw e;
  }
}

export async function itemById(db: DbOrTx, id: string): Promise<Item | null> {
  const [row] = await db.select().from(items).where(eq(items.id, id)).limit(1);
  return row ?? null;
}

export async function itemByIdentity(db: DbOrTx, identity: string): Promise<Item | null> {
  const [row] = await db.select().from(items).where(eq(items.identity, identity)).limit(1);
  return row ?? null;
}

/** True when `ancestorId` is `id` itself or sits above it now (one recursive query). */
async function isAtOrAbove(db: DbOrTx, ancestorId: string, id: string): Promise<boolean> {
  const rows = await db.all<{ hit: number }>(sql`
    WITH RECURSIVE up(id) AS (
      SELECT ${id}
      UNION
      SELECT l.parent_id FROM links l JOIN up ON l.child_id = up.id WHERE l.ended_at IS NULL
    )
    SELECT 1 AS hit FROM up WHERE id = ${ancestorId} LIMIT 1`);
  return rows.length > 0;
}

/**
 * Fits `child` into `parent` at `position`: appends the link and its event. Refuses a cycle (the
 * parent sitting inside the child) in code, and a second parent or an occupied position through
 * the schema's unique indexes, so two people fitting at once cannot both succeed.
 */
export async function fit(
  tx: DbOrTx,
  input: { parent: Item; child: Item; position: string; data?: Record<string, unknown> },
  by: Recorder,
): Promise<{ linkId: number; eventId: number }> {
  const { parent, child, position } = input;
  if (parent.id === child.id) throw new AppError(409, `${child.identity} cannot sit inside itself.`);
  if (await isAtOrAbove(tx, child.id, parent.id)) {
    throw new AppError(409, `${child.identity} already holds ${parent.identity}: fitting it would make a loop.`);
  }
  const at = by.at ?? now();
  const eventId = await appendEvent(tx, {
    actorId: by.actorId,
    station: by.station,
    type: "link.fitted",
    subjectKind: "item",
    subjectId: child.id,
    data: { parentId: parent.id, parent: parent.identity, child: child.identity, position, ...input.data },
    reason: by.reason ?? null,
    at,
  });
  try {
    const [row] = await tx
      .insert(links)
      .values({
        parentId: parent.id,
        parentKind: parent.kind,
        parentIdentity: parent.identity,
        childId: child.id,
        position,
        shared: SHARED_KINDS.includes(child.kind),
        startedAt: at,
        fitEventId: eventId,
      })
      .returning({ id: links.id });
    await addHoldings(tx, parent, child);
    return { linkId: row!.id, eventId };
  } catch (e) {
    if (isConstraintError(e, "UNIQUE")) {
      const [holder] = await tx
        .select({ parent: items.identity, position: links.position })
        .from(links)
        .innerJoin(items, eq(items.id, links.parentId))
        .where(and(eq(links.childId, child.id), isNull(links.endedAt), eq(links.shared, false)))
        .limit(1);
      throw new AppError(
        409,
        holder ? `${child.identity} already sits in ${holder.parent} at ${holder.position}.` : `Position ${position} of ${parent.identity} is already taken.`,
      );
    }
    throw e;
  }
}

/** Removes a child from its parent: ends the open link (once) with a removal event, and a reason. */
export async function removeFrom(
  tx: DbOrTx,
  input: { parent: Item; child: Item; data?: Record<string, unknown> },
  by: Recorder & { reason: string },
): Promise<{ linkId: number; eventId: number }> {
  const [open] = await tx
    .select({ id: links.id, position: links.position, startedAt: links.startedAt })
    .from(links)
    .where(and(eq(links.parentId, input.parent.id), eq(links.childId, input.child.id), isNull(links.endedAt)))
    .limit(1);
  if (!open) throw new AppError(409, `${input.child.identity} does not sit in ${input.parent.identity} now.`);
  const at = by.at ?? now();
  if (at < open.startedAt) throw new AppError(400, "A part cannot be removed before it was fitted.");
  const eventId = await appendEvent(tx, {
    actorId: by.actorId,
    station: by.station,
    type: "link.removed",
    subjectKind: "item",
    subjectId: input.child.id,
    data: { parentId: input.parent.id, parent: input.parent.identity, child: input.child.identity, position: open.position, linkId: open.id, ...input.data },
    reason: by.reason,
    at,
  });
  await tx.update(links).set({ endedAt: at, removeEventId: eventId }).where(eq(links.id, open.id));
  await removeHoldings(tx, input.parent, input.child);
  return { linkId: open.id, eventId };
}

/** Moves an item to a new state with the event that says why. */
export async function changeState(tx: DbOrTx, item: Item, state: string, by: Recorder, data: Record<string, unknown> = {}): Promise<void> {
  if (item.state === state) return;
  await appendEvent(tx, {
    actorId: by.actorId,
    station: by.station,
    type: "item.state_changed",
    subjectKind: "item",
    subjectId: item.id,
    data: { identity: item.identity, from: item.state, to: state, ...data },
    reason: by.reason ?? null,
    at: by.at,
  });
  await tx.update(items).set({ state }).where(eq(items.id, item.id));
  item.state = state;
}
