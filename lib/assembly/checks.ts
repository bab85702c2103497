/** Checking one scan against the pair, the model and the matched sets, without writing anything. */
import "server-only";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, models, type Item } from "@/db/schema";
import { holdRefusal } from "@/lib/containments/holds";
import { KIND_WORD, stateLabel } from "@/lib/vocabulary/item-kinds";
import { partWord } from "@/lib/vocabulary/part-types";
import { positionName } from "@/lib/vocabulary/positions";
import { sideWord, type Side } from "@/lib/vocabulary/sides";
import { pairContext, type PairContext } from "./context";
import { failureReason, findScanned, hasUnitResponse, holderOf, openMembership } from "./lookups";
import { checkTrimPart } from "./trim";

export interface ChosenPart {
  side: Side;
  slot: string;
  itemId: string;
}

export interface ScanInput {
  pairId: string;
  side: Side;
  /** A position code of the pair's model, or "XO". */
  slot: string;
  code: string;
  /** What this build has accepted so far at the other fields (the field being scanned is ignored). */
  chosen: ChosenPart[];
}

export type ScanCheck = { ok: true; item: { id: string; identity: string; partType: string | null } } | { ok: false; reason: string };

const refuse = (reason: string): ScanCheck => ({ ok: false, reason });

export async function checkScanIn(db: DbOrTx, ctx: PairContext, input: Omit<ScanInput, "pairId">): Promise<ScanCheck & { full?: Item }> {
  if (ctx.blocked) return refuse(ctx.blocked);
  const side = input.side;
  if (side !== "L" && side !== "R") return refuse("A speaker is either left or right.");
  const wanted = input.slot.trim().toUpperCase();
  const slot = ctx.slots.find((s) => s.slot === wanted);
  if (!slot) {
    const names = ctx.slots.map((s) => positionName(s.slot));
    return refuse(`${input.slot} is not a position of the ${ctx.model.code}: its positions are ${names.slice(0, -1).join(", ")} and ${names.at(-1) ?? ""}.`);
  }
  const found = await findScanned(db, input.code);
  if ("reason" in found) return refuse(found.reason);
  const item = found.item;
  const here = `this field is for the ${positionName(slot.slot)}`;

  if (slot.kind === "trim") return checkTrimPart(db, ctx, { side, slot, item, chosen: input.chosen });

  if (slot.kind === "crossover") {
    if (item.kind !== "crossover") return refuse(`${item.identity} is a ${item.kind === "drive_unit" ? partWord(item.partType) : KIND_WORD[item.kind] ?? item.kind}; ${here}: scan a crossover board.`);
    if (item.modelId !== ctx.model.id) {
      const [other] = item.modelId ? await db.select({ code: models.code }).from(models).where(eq(models.id, item.modelId)).limit(1) : [];
      return refuse(`${item.identity} is a crossover for the ${other?.code ?? "another model"}; this pair is a ${ctx.model.code}.`);
    }
  } else {
    if (item.kind !== "drive_unit") return refuse(`${item.identity} is a ${KIND_WORD[item.kind] ?? item.kind}; ${here}: scan a ${partWord(slot.partType)}.`);
    if (item.partType !== slot.partType) return refuse(`${item.identity} is a ${partWord(item.partType)}; ${here}: scan a ${partWord(slot.partType)}.`);
  }

  const others = input.chosen.filter((c) => !(c.side === side && c.slot === slot.slot));
  const twice = others.find((c) => c.itemId === item.id);
  if (twice) {
    const where = ctx.slots.find((s) => s.slot === twice.slot)?.label ?? twice.slot;
    return refuse(`${item.identity} is already scanned for the ${sideWord(twice.side)} ${where} in this build: each part goes in once.`);
  }

  if (item.state === "failed") {
    const why = await failureReason(db, item.id);
    return refuse(`${item.identity} failed on the bench: ${why ?? "no reason was recorded"}. It cannot be fitted.`);
  }
  // A quarantined part (or one inside something an open containment holds) waits for quality.
  const held = await holdRefusal(db, item, "be fitted");
  if (held) return refuse(held);
  const holder = await holderOf(db, item.id);
  if (holder) return refuse(`${item.identity} is already fitted, as the ${positionName(holder.position)} of ${holder.parent}.`);
  if (item.state === "scrapped") return refuse(`${item.identity} is scrapped.`);

  // Drive units and crossover boards alike: measured, matched left and right by the lab, and
  // reserved in a set of this model. A board that passed its check is in stock until the lab
  // pairs it; one in no set would let a speaker pair carry two boards nobody compared.
  const set = await openMembership(db, item.id);
  const noun = slot.kind === "drive_unit" ? "unit" : "board";
  if (!(await hasUnitResponse(db, item.id))) {
    return refuse(
      slot.kind === "drive_unit"
        ? `${item.identity} has no measured response: the lab measures every unit before it is matched and fitted.`
        : `${item.identity} has no measured response: the lab measures every board and pairs it left and right before it is fitted.`,
    );
  }
  if (!set || set.kind !== slot.kind) {
    return refuse(
      slot.kind === "drive_unit"
        ? `${item.identity} is not in a matched set; the lab reserves units in sets before assembly.`
        : `${item.identity} is not in a matched set of boards; the lab pairs boards left and right in sets before assembly, as it does drive units.`,
    );
  }
  if (set.modelId && set.modelId !== ctx.model.id) return refuse(`${item.identity} is in set ${set.code}, matched for the ${set.modelCode ?? "another model"}; this pair is a ${ctx.model.code}.`);
  if (item.state !== "reserved") return refuse(`${item.identity} is ${stateLabel(item.state)}: only a ${noun} reserved in a matched set is fitted.`);

  // Left and right of a position come from one matched set: the partner rule, from both ends.
  const other = others.find((c) => c.side !== side && c.slot === slot.slot);
  if (other) {
    const otherSet = await openMembership(db, other.itemId);
    const [otherItem] = await db.select({ identity: items.identity }).from(items).where(eq(items.id, other.itemId)).limit(1);
    if (otherSet) {
      if (otherSet.partner?.itemId !== item.id) {
        return refuse(`The ${sideWord(other.side)} ${slot.label} is from set ${otherSet.code}; the ${sideWord(side)} one must be its partner ${otherSet.partner?.identity ?? "(none recorded)"}.`);
      }
    } else {
      return refuse(`${item.identity} is in set ${set.code}: its partner ${set.partner?.identity ?? "(none recorded)"} goes on the ${sideWord(other.side)}, but the ${sideWord(other.side)} ${slot.label} is ${otherItem?.identity ?? "another part"}.`);
    }
  }
  return { ok: true, item: { id: item.id, identity: item.identity, partType: item.partType }, full: item };
}

/**
 * Checks one scan at the station and writes nothing. Refuses, each with a reason a fitter reads
 * at the bench: a pair on hold or whose cabinets have not finished their route (or already built);
 * an unknown or misread serial; the wrong kind of part for the field; the wrong part type for the
 * position; a crossover of another model; a part failed on the bench or never measured; a part
 * already fitted elsewhere; a drive unit or crossover board not reserved in a matched set (or in
 * one matched for another model); a part that is not the set partner of the one chosen at the
 * same position on the other side; a part scanned twice in this build.
 */
export async function checkScan(db: DbOrTx, input: ScanInput): Promise<ScanCheck> {
  const [pair] = await db.select().from(items).where(eq(items.id, input.pairId)).limit(1);
  if (!pair || pair.kind !== "pair") return refuse("That pair is not in the register.");
  const ctx = await pairContext(db, pair);
  const { full: _full, ...result } = (await checkScanIn(db, ctx, input)) as ScanCheck & { full?: Item };
  return result as ScanCheck;
}
