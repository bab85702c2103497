/**
 * Lacquered cabinets: made several at a time without veneer (their colour is sprayed, so nothing
 * ties two cabinets together from birth), each travels the cabinet route on its own, and assembly
 * pairs two finished ones of one model and colour.
 */
import "server-only";
import { and, asc, desc, eq, inArray, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, links, models, type Finish, type Item } from "@/db/schema";
import { findScanned, holderOf } from "@/lib/assembly/lookups";
import { ASSEMBLY_STATION } from "@/lib/assembly/station";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { createItem, fit, type Recorder } from "@/lib/genealogy/graph";
import { allocateSerial } from "@/lib/serials/allocator";
import type { Actor } from "@/lib/vocabulary/actor";
import { KIND_WORD, stateLabel } from "@/lib/vocabulary/item-kinds";
import { PAIR_CABINET_POSITION as CAB_POSITION } from "@/lib/vocabulary/positions";
import type { Station } from "@/lib/vocabulary/stations";

/** Cabinets for a lacquer colour, made several at once without leaves; they are paired at assembly. */
export async function makeLacquerCabinets(db: DbOrTx, input: { modelId: string; finishId: string; count: number }, actor: Actor, station: Station = "cabinet"): Promise<Item[]> {
  const [model] = await db.select().from(models).where(eq(models.id, input.modelId)).limit(1);
  if (!model || !model.active) throw new AppError(400, "Choose a model from the list.", { modelId: ["Choose a model from the list."] });
  const [finish] = await db.select().from(finishes).where(eq(finishes.id, input.finishId)).limit(1);
  if (!finish || !finish.active) throw new AppError(400, "Choose a colour from the list.", { finishId: ["Choose a colour from the list."] });
  if (finish.kind !== "lacquer") throw new AppError(400, `${finish.name} is a veneer: veneered cabinets are made from a flitch's plan in the veneer room.`, { finishId: ["Choose a lacquer colour."] });
  return db.transaction(async (tx) => {
    const year = clockNow().getUTCFullYear();
    const recorder: Recorder = { actorId: actor.id, station };
    const batchEvent = await appendEvent(tx, {
      actorId: actor.id,
      station,
      type: "cabinet.batch_started",
      subjectKind: "model",
      subjectId: model.id,
      data: { model: model.code, finish: finish.name, count: input.count },
    });
    const out: Item[] = [];
    for (let i = 0; i < input.count; i++) {
      out.push(
        await createItem(
          tx,
          { kind: "cabinet", identity: await allocateSerial(tx, { kind: "cabinet", code: model.code, year }), state: "in_progress", modelId: model.id, finishId: finish.id, attrs: { batchEventId: batchEvent } },
          recorder,
        ),
      );
    }
    return out;
  });
}

/** Lacquer cabinets in no pair yet, newest first, with their model and colour. */
export function lacquerCabinetsWaiting(db: DbOrTx, limit = 300) {
  return db
    .select({ identity: items.identity, state: items.state, createdAt: items.createdAt, model: models.code, colour: finishes.name })
    .from(items)
    .innerJoin(finishes, eq(finishes.id, items.finishId))
    .leftJoin(models, eq(models.id, items.modelId))
    .where(and(eq(items.kind, "cabinet"), eq(finishes.kind, "lacquer"), isNull(sql`(SELECT 1 FROM links l WHERE l.child_id = ${items.id} AND l.ended_at IS NULL LIMIT 1)`)))
    .orderBy(desc(items.createdAt))
    .limit(limit);
}

/**
 * Pairs two lacquer cabinets into a new pair (P-MODEL-…, "in production"), holding them at CAB-L
 * and CAB-R. Lacquer cabinets are made in batches without a pair, so they are paired here. Refuses
 * an unknown cabinet, the same one twice, a scrapped one, a veneered one (paired at the flitch),
 * one already in a pair, one that has not finished ("finished" state), and two of different models
 * or colours; each reason is under `left` or `right`, and nothing is written.
 *
 * Unpaired lacquer cabinets have no pair, so the route cannot record their steps (recordStep
 * works on pairs); how their route is recorded is outside this station. Until then a cabinet's
 * state "finished" is what says it is done, and a pair made here is taken as having finished its
 * route when both its cabinets are "finished" and it has no route records.
 */
export async function pairLacquerCabinets(db: DbOrTx, input: { left: string; right: string }, actor: Actor): Promise<{ pair: Item; left: Item; right: Item }> {
  return db.transaction(async (tx) => {
    const errors: Record<string, string[]> = {};
    const found: Partial<Record<"left" | "right", Item>> = {};
    for (const key of ["left", "right"] as const) {
      const text = input[key];
      const r = text.trim() ? await findScanned(tx, text) : { reason: `Scan the ${key} cabinet.` };
      if ("reason" in r) errors[key] = [r.reason];
      else if (r.item.kind !== "cabinet") errors[key] = [`${r.item.identity} is a ${KIND_WORD[r.item.kind] ?? r.item.kind}, not a cabinet.`];
      else found[key] = r.item;
    }
    const { left, right } = found;
    if (left && right && left.id === right.id) errors.right = [`${right.identity} is the left cabinet already: scan two different cabinets.`];
    const finishOf = new Map<string, Finish>();
    for (const key of ["left", "right"] as const) {
      const c = found[key];
      if (!c || errors[key]) continue;
      const [f] = c.finishId ? await tx.select().from(finishes).where(eq(finishes.id, c.finishId)).limit(1) : [];
      if (f) finishOf.set(c.id, f);
      const holder = await holderOf(tx, c.id);
      if (c.state === "scrapped") errors[key] = [`${c.identity} is scrapped.`];
      else if (f?.kind === "veneer") errors[key] = [`${c.identity} is veneered (${f.name}): veneered cabinets are paired at the flitch.`];
      else if (!f) errors[key] = [`${c.identity} has no lacquer colour recorded.`];
      else if (holder) errors[key] = [`${c.identity} is already in ${holder.parent} at ${holder.position}.`];
      else if (c.state !== "finished") errors[key] = [`${c.identity} is ${stateLabel(c.state)}: lacquer cabinets are paired once they have finished their route.`];
    }
    if (left && right && !errors.left && !errors.right) {
      if (left.modelId !== right.modelId) {
        const codes = await tx.select({ id: models.id, code: models.code }).from(models).where(inArray(models.id, [left.modelId ?? "", right.modelId ?? ""]));
        const code = (id: string | null) => codes.find((c) => c.id === id)?.code ?? "no model";
        errors.right = [`${left.identity} is a ${code(left.modelId)} and ${right.identity} a ${code(right.modelId)}: a pair is two cabinets of one model.`];
      } else if (left.finishId !== right.finishId) {
        errors.right = [`${left.identity} is ${finishOf.get(left.id)?.name} and ${right.identity} is ${finishOf.get(right.id)?.name}: a pair is two cabinets of one colour.`];
      }
    }
    const keys = Object.keys(errors);
    if (keys.length) throw new AppError(409, `Nothing was paired: ${errors[keys[0]!]![0]}`, errors);

    const [model] = await tx.select().from(models).where(eq(models.id, left!.modelId!)).limit(1);
    if (!model) throw new AppError(409, `${left!.identity} has no model recorded.`);
    const by: Recorder = { actorId: actor.id, station: ASSEMBLY_STATION };
    const pair = await createItem(
      tx,
      {
        kind: "pair",
        identity: await allocateSerial(tx, { kind: "pair", code: model.code, year: clockNow().getUTCFullYear() }),
        state: "in_production",
        modelId: model.id,
        finishId: left!.finishId,
        attrs: { pairedAt: "assembly" },
      },
      by,
    );
    await fit(tx, { parent: pair, child: left!, position: CAB_POSITION.L }, by);
    await fit(tx, { parent: pair, child: right!, position: CAB_POSITION.R }, by);
    await appendEvent(tx, {
      actorId: actor.id,
      station: ASSEMBLY_STATION,
      type: "pair.lacquer_paired",
      subjectKind: "item",
      subjectId: pair.id,
      data: { identity: pair.identity, model: model.code, colour: finishOf.get(left!.id)?.name ?? null, left: left!.identity, right: right!.identity },
    });
    return { pair, left: left!, right: right! };
  });
}


export interface LacquerGroup {
  modelId: string;
  model: string;
  modelName: string;
  finishId: string;
  colour: string;
  cabinets: string[];
}

/** Finished lacquer cabinets in no pair, by model and colour, oldest first within each. */
export async function unpairedLacquerCabinets(db: DbOrTx): Promise<LacquerGroup[]> {
  const rows = await db
    .select({ identity: items.identity, modelId: models.id, model: models.code, modelName: models.name, finishId: finishes.id, colour: finishes.name })
    .from(items)
    .innerJoin(finishes, eq(finishes.id, items.finishId))
    .innerJoin(models, eq(models.id, items.modelId))
    .where(
      and(
        eq(items.kind, "cabinet"),
        eq(items.state, "finished"),
        eq(finishes.kind, "lacquer"),
        sql`NOT EXISTS (SELECT 1 FROM ${links} l WHERE l.child_id = ${items.id} AND l.ended_at IS NULL)`,
      ),
    )
    .orderBy(asc(models.code), asc(finishes.name), asc(items.createdAt));
  const groups = new Map<string, LacquerGroup>();
  for (const r of rows) {
    const key = `${r.modelId}|${r.finishId}`;
    const g = groups.get(key) ?? { modelId: r.modelId, model: r.model, modelName: r.modelName, finishId: r.finishId, colour: r.colour, cabinets: [] };
    g.cabinets.push(r.identity);
    groups.set(key, g);
  }
  return [...groups.values()];
}
