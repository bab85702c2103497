/** What the assembly station reads: a pair's view, the pair a scan names, the pairs waiting, the reserved sets. */
import "server-only";
import { and, asc, eq, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, links, type Finish, type Item, type Model } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import type { Hold } from "@/lib/containments/holds";
import { now as clockNow } from "@/lib/clock";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { openSets } from "@/lib/lab/units";
import { normaliseScan, serialReadings } from "@/lib/serials/format";
import { KIND_WORD } from "@/lib/vocabulary/item-kinds";
import { type PartType } from "@/lib/vocabulary/part-types";
import { type Side } from "@/lib/vocabulary/sides";
import { pairContext } from "./context";
import { findScanned } from "./lookups";
import type { Slot } from "./slots";

// ---- what the station reads ---------------------------------------------------------------------

export interface AssemblyView {
  pair: Item;
  model: Model;
  finish: Finish | null;
  lacquer: boolean;
  slots: Slot[];
  positions: { position: string; partType: PartType; count: number }[];
  cabinets: { side: Side; item: Item }[];
  routeFinished: boolean;
  next: string | null;
  openNcs: { code: string; finding: string }[];
  /** Open containments holding the pair, a cabinet of it or a part in it. */
  holds: Hold[];
  /** Why the pair cannot be built now (on hold, route not finished, built already…), or null. */
  blocked: string | null;
  /** Once assembled: each speaker with what sits in it. */
  speakers: { side: Side; item: Item; parts: { position: string; identity: string; kind: string; partType: string | null }[] }[];
}

/** A pair at the assembly station: its model and positions, cabinets, route, holds and, once built, its speakers. */
export async function assemblyView(db: DbOrTx, pairIdentity: string): Promise<AssemblyView | null> {
  const readings = serialReadings(pairIdentity).filter((r) => r.valid);
  const pair = (readings[0] ? await itemByIdentity(db, readings[0].canonical) : null) ?? (await itemByIdentity(db, normaliseScan(pairIdentity)));
  if (!pair || pair.kind !== "pair" || !pair.modelId) return null;
  const ctx = await pairContext(db, pair);
  const positions = ctx.positions;
  const speakers: AssemblyView["speakers"] = [];
  for (const s of ctx.speakers) {
    const rows = await db
      .select({ position: links.position, identity: items.identity, kind: items.kind, partType: items.partType })
      .from(links)
      .innerJoin(items, eq(items.id, links.childId))
      .where(and(eq(links.parentId, s.item.id), isNull(links.endedAt)))
      .orderBy(asc(links.position));
    speakers.push({ side: s.side, item: s.item, parts: rows });
  }
  return {
    pair,
    model: ctx.model,
    finish: ctx.finish,
    lacquer: ctx.lacquer,
    slots: ctx.slots,
    positions,
    cabinets: ctx.cabinets,
    routeFinished: ctx.routeFinished,
    next: ctx.next,
    openNcs: ctx.openNcs,
    holds: ctx.holds,
    blocked: ctx.blocked,
    speakers,
  };
}

/** The pair a scanned label belongs to: the pair itself, one of its cabinets, or one of its speakers. */
export async function pairForScan(db: DbOrTx, code: string): Promise<Item> {
  const found = await findScanned(db, code);
  if ("reason" in found) throw new AppError(404, found.reason, { code: [found.reason] });
  const item = found.item;
  if (item.kind === "pair") return item;
  if (item.kind === "cabinet" || item.kind === "speaker") {
    const [holder] = await db
      .select({ pair: items })
      .from(links)
      .innerJoin(items, eq(items.id, links.parentId))
      .where(and(eq(links.childId, item.id), isNull(links.endedAt)))
      .limit(1);
    if (holder?.pair.kind === "pair") return holder.pair;
    if (holder?.pair.kind === "speaker") {
      const [up] = await db.select({ pair: items }).from(links).innerJoin(items, eq(items.id, links.parentId)).where(and(eq(links.childId, holder.pair.id), isNull(links.endedAt), eq(items.kind, "pair"))).limit(1);
      if (up) return up.pair;
    }
    if (item.kind === "cabinet" && !holder) {
      const [f] = item.finishId ? await db.select().from(finishes).where(eq(finishes.id, item.finishId)).limit(1) : [];
      const message = f?.kind === "lacquer" ? `${item.identity} is a lacquer cabinet in no pair yet: pair it with another of its model and colour below.` : `${item.identity} is in no pair now.`;
      throw new AppError(404, message, { code: [message] });
    }
  }
  const message = `${item.identity} is a ${KIND_WORD[item.kind] ?? item.kind}: scan a pair, cabinet or speaker label.`;
  throw new AppError(404, message, { code: [message] });
}

export interface WaitingPair {
  identity: string;
  model: string;
  finish: string | null;
  lacquer: boolean;
  cabinets: string[];
  openNcs: string[];
  /** Codes of the open containments holding it: it waits for quality, not for assembly. */
  heldBy: string[];
  /** When the route finished (its last record), or when the lacquer pair was made. */
  readySince: Date;
}

/** Pairs in production whose cabinets have finished their route, oldest first (those on hold flagged). */
export async function pairsAwaitingAssembly(db: DbOrTx, at: Date = clockNow()): Promise<WaitingPair[]> {
  const pairs = await db.select().from(items).where(and(eq(items.kind, "pair"), eq(items.state, "in_production")))
    // "+": read through items_kind_state_idx, then sorted (lib/route/shop.ts says why).
    .orderBy(sql`+${items.createdAt}`);
  const out: WaitingPair[] = [];
  for (const pair of pairs) {
    const ctx = await pairContext(db, pair, at);
    if (!ctx.routeFinished || ctx.speakers.length) continue;
    out.push({
      identity: pair.identity,
      model: ctx.model.code,
      finish: ctx.finish?.name ?? null,
      lacquer: ctx.lacquer,
      cabinets: ctx.cabinets.map((c) => c.item.identity),
      openNcs: ctx.openNcs.map((n) => n.code),
      heldBy: [...new Set(ctx.holds.map((h) => h.code))],
      readySince: ctx.route?.records.at(-1)?.recordedAt ?? pair.createdAt,
    });
  }
  return out.sort((a, b) => a.readySince.getTime() - b.readySince.getTime());
}


export interface SetGroup {
  /** tweeter | midrange | bass, or "crossover" for sets of boards. */
  partType: string;
  sets: { code: string; model: string | null; left: string | null; right: string | null; maxDiffDb: number; limitDb: number }[];
}

/** The matched sets reserved and not yet fitted, grouped by part type (boards last). */
export async function reservedSets(db: DbOrTx): Promise<SetGroup[]> {
  const sets = await openSets(db);
  const order = ["tweeter", "midrange", "bass", "crossover"];
  const groups = new Map<string, SetGroup>();
  for (const s of sets) {
    const type = s.partType ?? "crossover";
    const g = groups.get(type) ?? { partType: type, sets: [] };
    g.sets.push({ code: s.code, model: s.model, left: s.L ?? null, right: s.R ?? null, maxDiffDb: s.maxDiffDb, limitDb: s.limitDb });
    groups.set(type, g);
  }
  return [...groups.values()].sort((a, b) => order.indexOf(a.partType) - order.indexOf(b.partType));
}
