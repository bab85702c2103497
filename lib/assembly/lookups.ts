/** What a scan names, and what the register says about that part: where it sits, its matched set, its measurements, why it failed. */
import "server-only";
import { and, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { batchUnits, events, items, links, matchedSets, models, responses, setMembers, type Item } from "@/db/schema";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { normaliseScan, serialReadings } from "@/lib/serials/format";
import { type Side } from "@/lib/vocabulary/sides";

// ---- reading one scan ---------------------------------------------------------------------------

/** The item a scan names: a Twinleaf serial (forgiving missing hyphens and case), or a drive unit's maker serial. */
export async function findScanned(db: DbOrTx, code: string): Promise<{ item: Item } | { reason: string }> {
  const text = normaliseScan(code);
  if (!text) return { reason: "Scan or type the label." };
  const readings = serialReadings(text);
  for (const r of readings.filter((x) => x.valid)) {
    const hit = await itemByIdentity(db, r.canonical);
    if (hit) return { item: hit };
  }
  const direct = await itemByIdentity(db, text);
  if (direct) return { item: direct };
  const byMaker = await db
    .select({ item: items })
    .from(batchUnits)
    .innerJoin(items, eq(items.id, batchUnits.itemId))
    .where(inArray(batchUnits.makerSerial, [...new Set([code.trim(), text])]))
    .limit(2);
  if (byMaker.length === 1) return { item: byMaker[0]!.item };
  if (readings.length && !readings.some((r) => r.valid)) {
    return { reason: `${readings[0]!.canonical} does not check: its last character does not fit the rest, so it was misread or mistyped. Scan the label again.` };
  }
  return { reason: `${text} is not in the register: check the label and scan again.` };
}

/** The open (non-shared) link that holds an item now: what it sits in, and where. */
export async function holderOf(db: DbOrTx, itemId: string) {
  const [row] = await db
    .select({ parent: links.parentIdentity, parentId: links.parentId, position: links.position })
    .from(links)
    .where(and(eq(links.childId, itemId), isNull(links.endedAt), eq(links.shared, false)))
    .limit(1);
  if (!row) return null;
  const parent = row.parent ?? (await db.select({ identity: items.identity }).from(items).where(eq(items.id, row.parentId)).limit(1))[0]?.identity ?? "another item";
  return { parent, position: row.position };
}

export interface OpenMembership {
  memberId: number;
  setId: string;
  code: string;
  kind: "drive_unit" | "crossover";
  modelId: string | null;
  modelCode: string | null;
  side: Side;
  partner: { itemId: string; identity: string } | null;
}

/** The matched set an item is reserved in now, with its partner on the other side. */
export async function openMembership(db: DbOrTx, itemId: string): Promise<OpenMembership | null> {
  const [m] = await db
    .select({ memberId: setMembers.id, setId: matchedSets.id, code: matchedSets.code, kind: matchedSets.kind, modelId: matchedSets.modelId, modelCode: models.code, side: setMembers.side })
    .from(setMembers)
    .innerJoin(matchedSets, eq(matchedSets.id, setMembers.setId))
    .leftJoin(models, eq(models.id, matchedSets.modelId))
    .where(and(eq(setMembers.itemId, itemId), isNull(setMembers.endedAt)))
    .limit(1);
  if (!m) return null;
  const [partner] = await db
    .select({ itemId: items.id, identity: items.identity })
    .from(setMembers)
    .innerJoin(items, eq(items.id, setMembers.itemId))
    .where(and(eq(setMembers.setId, m.setId), sql`${setMembers.itemId} <> ${itemId}`))
    .limit(1);
  return { ...m, partner: partner ?? null };
}

export async function hasUnitResponse(db: DbOrTx, itemId: string) {
  const [r] = await db.select({ id: responses.id }).from(responses).where(and(eq(responses.itemId, itemId), eq(responses.purpose, "unit"))).limit(1);
  return Boolean(r);
}

/** Why an item was set aside: the reason of its newest change of state to "failed". */
export async function failureReason(db: DbOrTx, itemId: string): Promise<string | null> {
  const [e] = await db
    .select({ reason: events.reason })
    .from(events)
    .where(and(eq(events.subjectKind, "item"), eq(events.subjectId, itemId), eq(events.type, "item.state_changed"), sql`json_extract(${events.data}, '$.to') = 'failed'`))
    .orderBy(desc(events.id))
    .limit(1);
  return e?.reason?.trim() || null;
}
