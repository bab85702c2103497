/** Checking a scanned trim part for a trim slot of the speaker, without writing anything. */
import "server-only";
import { eq } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { models, type Item } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { holdRefusal } from "@/lib/containments/holds";
import { routeOf } from "@/lib/route/pair-route";
import { KIND_WORD } from "@/lib/vocabulary/item-kinds";
import { positionName } from "@/lib/vocabulary/positions";
import { sideWord, type Side } from "@/lib/vocabulary/sides";
import type { PairContext } from "./context";
import type { ChosenPart, ScanCheck } from "./checks";
import { holderOf } from "./lookups";
import type { Slot } from "./slots";

/**
 * A trim part fits a trim slot when it is a trim part of the pair's model, received for the slot's
 * trim position, not scrapped, not held by an open containment (itself or its supplier's lot), not
 * fitted anywhere, not scanned for another field of this build, and has finished its trim route.
 */
export async function checkTrimPart(db: DbOrTx, ctx: PairContext, input: { side: Side; slot: Slot; item: Item; chosen: ChosenPart[] }): Promise<ScanCheck & { full?: Item }> {
  const { slot, item, side } = input;
  const refuse = (reason: string): ScanCheck => ({ ok: false, reason });
  if (item.kind !== "trim_part") return refuse(`${item.identity} is a ${KIND_WORD[item.kind] ?? item.kind}; this field is for the ${slot.label}: scan a trim part.`);
  if (item.modelId !== ctx.model.id) {
    const [other] = item.modelId ? await db.select({ code: models.code }).from(models).where(eq(models.id, item.modelId)).limit(1) : [];
    return refuse(`${item.identity} is a trim part for the ${other?.code ?? "another model"}; this pair is a ${ctx.model.code}.`);
  }
  if (item.partType !== slot.trimPosition) {
    return refuse(`${item.identity} was received as ${positionName(item.partType ?? "")}; this field is for the ${slot.label} (${slot.trimPosition}).`);
  }
  const twice = input.chosen.filter((c) => !(c.side === side && c.slot === slot.slot)).find((c) => c.itemId === item.id);
  if (twice) {
    const where = ctx.slots.find((s) => s.slot === twice.slot)?.label ?? twice.slot;
    return refuse(`${item.identity} is already scanned for the ${sideWord(twice.side)} ${where} in this build: each part goes in once.`);
  }
  if (item.state === "scrapped") return refuse(`${item.identity} is scrapped.`);
  const held = await holdRefusal(db, item, "be fitted");
  if (held) return refuse(held);
  const holder = await holderOf(db, item.id);
  if (holder) return refuse(`${item.identity} is already fitted, as the ${positionName(holder.position)} of ${holder.parent}.`);
  let route;
  try {
    route = await routeOf(db, item);
  } catch (e) {
    if (e instanceof AppError) return refuse(`${item.identity} cannot be fitted: ${e.message}`);
    throw e;
  }
  const open = route.ncs.filter((n) => !n.disposition);
  if (open.length) return refuse(`${item.identity} is on hold: nonconformance ${open.map((n) => n.code).join(", ")} is open. Quality dispositions it before it is fitted.`);
  const next = route.position.cabinets[0]?.next;
  if (next) return refuse(`${item.identity} has not finished its route: its next step is ${next.seq}, ${next.name}.`);
  return { ok: true, item: { id: item.id, identity: item.identity, partType: item.partType }, full: item };
}
