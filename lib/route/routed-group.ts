/**
 * The one place that says what travels a route: a "routed group" is the item the route records
 * hang on (route_records.pair_id, nonconformances.pair_id and route_starts.pair_id hold its id,
 * whatever its kind) and the members the steps are done on, each with a side.
 *
 * - a pair: its cabinets at CAB-L and CAB-R, sides L and R;
 * - a lone lacquer cabinet (made in a batch, not yet paired at assembly): itself, as side "L";
 * - a metal trim part (top housing, plinth, bezel): itself, as side "L", on its model's trim route.
 *
 * The route rules (lib/route/rules.ts) only know sides, so a one-member group is a group whose
 * only side is "L"; the engine (lib/route/pair-route.ts) and the pages ask this module for the
 * words that fit the group ("the trim part" rather than "the left cabinet").
 */
import "server-only";
import { and, eq, inArray, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, links, type Item } from "@/db/schema";
import { itemByIdentity } from "@/lib/genealogy/graph";
import { parseSerial } from "@/lib/serials/format";
import type { RouteKind } from "@/lib/vocabulary/route-kinds";
import { PAIR_CABINET_POSITION, sideOfCabinetPosition } from "@/lib/vocabulary/positions";
import type { Side } from "./types";
import { groupWords, type RoutedKind } from "./group-words";

export type { RoutedKind };
export { groupWords };

export interface RoutedGroup {
  /** The item the route's records hang on. */
  item: Item;
  kind: RoutedKind;
  routeKind: RouteKind;
  /** What the steps are done on, by side: both cabinets of a pair, or the one lone item as "L". */
  members: { side: Side; item: Item }[];
}

/**
 * A lacquer cabinet is made in a batch without a pair and travels the route on its own until
 * assembly pairs it: its route records are kept under its own id, as its own one-cabinet group.
 */
export async function isLoneLacquerCabinet(db: DbOrTx, item: Item): Promise<boolean> {
  if (item.kind !== "cabinet" || !item.finishId) return false;
  const [finish] = await db.select({ kind: finishes.kind }).from(finishes).where(eq(finishes.id, item.finishId)).limit(1);
  if (finish?.kind !== "lacquer") return false;
  const [held] = await db.select({ id: links.id }).from(links).where(and(eq(links.childId, item.id), isNull(links.endedAt))).limit(1);
  return !held;
}

/** What kind of routed group an item heads, or null when the route's records do not hang on it. */
export async function routedKindOf(db: DbOrTx, item: Item): Promise<RoutedKind | null> {
  if (!item.modelId) return null;
  if (item.kind === "pair") return "pair";
  if (item.kind === "trim_part") return "trim_part";
  if (item.kind === "cabinet" && (await isLoneLacquerCabinet(db, item))) return "lone_cabinet";
  return null;
}

/** The group an item heads, with its members now; null when it heads none. */
export async function routedGroup(db: DbOrTx, item: Item): Promise<RoutedGroup | null> {
  const kind = await routedKindOf(db, item);
  if (!kind) return null;
  if (kind !== "pair") return { item, kind, routeKind: kind === "trim_part" ? "trim" : "cabinet", members: [{ side: "L", item }] };
  const held = await db
    .select({ item: items, position: links.position })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, item.id), isNull(links.endedAt), inArray(links.position, [PAIR_CABINET_POSITION.L, PAIR_CABINET_POSITION.R])));
  const members = held.map((h) => ({ side: sideOfCabinetPosition(h.position)!, item: h.item })).sort((a, b) => a.side.localeCompare(b.side));
  return { item, kind, routeKind: "cabinet", members };
}

/**
 * The routed item a scanned serial belongs to: a pair, a lone lacquer cabinet or a trim part
 * itself, or the pair holding a scanned cabinet. Null for anything else.
 */
export async function routedItemOf(db: DbOrTx, text: string): Promise<Item | null> {
  const parsed = parseSerial(text);
  const identity = parsed?.valid ? parsed.canonical : text.trim().toUpperCase();
  const item = await itemByIdentity(db, identity);
  if (!item) return null;
  if (await routedKindOf(db, item)) return item;
  if (item.kind === "cabinet") {
    const [holder] = await db
      .select({ pair: items })
      .from(links)
      .innerJoin(items, eq(items.id, links.parentId))
      .where(and(eq(links.childId, item.id), isNull(links.endedAt), eq(items.kind, "pair")))
      .limit(1);
    return holder?.pair ?? null;
  }
  return null;
}
