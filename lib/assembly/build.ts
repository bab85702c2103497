/** Building a pair into two speakers in one transaction, with every scan checked again inside it. */
import "server-only";
import { and, eq, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { items, setMembers, type Item } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { changeState, createItem, fit, removeFrom, type Recorder } from "@/lib/genealogy/graph";
import { allocateSerial } from "@/lib/serials/allocator";
import type { Actor } from "@/lib/vocabulary/actor";
import { PAIR_SPEAKER_POSITION, SPEAKER_CABINET_POSITION } from "@/lib/vocabulary/positions";
import { SIDES, sideWord, type Side } from "@/lib/vocabulary/sides";
import { ASSEMBLY_STATION } from "./station";
import { checkScanIn, type ChosenPart } from "./checks";
import { pairContext } from "./context";
import { openMembership } from "./lookups";
import { slotKey } from "./slots";

// ---- building -----------------------------------------------------------------------------------

export interface BuildInput {
  pairId: string;
  scans: { side: Side; slot: string; code: string }[];
  inspection: { clean: boolean; inspected: boolean; note: string };
}

export interface BuildResult {
  pair: Item;
  speakers: Record<Side, Item>;
}

const NOTE_MAX = 500;

/**
 * Builds a pair's two speakers in one transaction. Every scan is checked again here with the same
 * rules as `checkScan`; every position of the model on both sides and the crossover must be
 * scanned, and the final clean and inspection ticked. Any problem refuses the whole build with
 * each field's reason under "L.T", "R.XO"… and nothing is written. Then: two speakers with
 * serials; each cabinet leaves the pair ("built into its speaker") and sits in its speaker at CAB;
 * each drive unit at its position and the crossover at XO, their set reservations ended once
 * ("fitted", with an event) and their states "fitted"; the speakers "built" and fitted into the
 * pair at L and R; the pair "awaiting_test"; and the events "pair.assembled" and "pair.inspected".
 */
export async function buildSpeakers(db: DbOrTx, input: BuildInput, actor: Actor): Promise<BuildResult> {
  return db.transaction(async (tx) => {
    const [pair] = await tx.select().from(items).where(eq(items.id, input.pairId)).limit(1);
    if (!pair || pair.kind !== "pair") throw new AppError(404, "That pair is not in the register.");
    const ctx = await pairContext(tx, pair);
    if (ctx.blocked) throw new AppError(409, `Nothing was built: ${ctx.blocked}`);

    const errors: Record<string, string[]> = {};
    const add = (key: string, message: string) => (errors[key] ??= []).push(message);
    let refusals = 0;

    const bySlot = new Map<string, { side: Side; slot: string; code: string }>();
    for (const s of input.scans) {
      const slot = s.slot.trim().toUpperCase();
      if (!s.code.trim()) continue;
      if (!ctx.slots.some((x) => x.slot === slot) || (s.side !== "L" && s.side !== "R")) {
        add("scans", `${s.side}/${s.slot} is not a field of the ${ctx.model.code}.`);
        continue;
      }
      const key = slotKey(s.side, slot);
      if (bySlot.has(key)) add(key, "Two scans were sent for this field; scan it once.");
      else bySlot.set(key, { side: s.side, slot, code: s.code });
    }

    const chosen: ChosenPart[] = [];
    const picked = new Map<string, Item>();
    for (const side of SIDES) {
      for (const slot of ctx.slots) {
        const key = slotKey(side, slot.slot);
        if (errors[key]) continue;
        const scan = bySlot.get(key);
        if (!scan) {
          add(key, `Scan the ${sideWord(side)} ${slot.label}${slot.kind === "drive_unit" ? ` (${slot.slot})` : ""}.`);
          continue;
        }
        const r = await checkScanIn(tx, ctx, { side, slot: slot.slot, code: scan.code, chosen });
        if (r.ok) {
          chosen.push({ side, slot: slot.slot, itemId: r.item.id });
          picked.set(key, r.full!);
        } else {
          refusals++;
          add(key, r.reason);
        }
      }
    }
    if (!input.inspection.clean) add("clean", "Tick the final clean: both speakers cleaned, no dust, flux or fingerprints.");
    if (!input.inspection.inspected) add("inspected", "Tick the final inspection: every part seated, every joint and screw checked.");
    if (input.inspection.note.length > NOTE_MAX) add("note", `At most ${NOTE_MAX} characters.`);

    const keys = Object.keys(errors);
    if (keys.length) {
      const first = errors[keys[0]!]![0]!;
      const fields = keys.length === 1 ? "1 field needs" : `${keys.length} fields need`;
      throw new AppError(refusals ? 409 : 400, `Nothing was built: ${fields} attention. ${first}`, errors);
    }

    const by: Recorder = { actorId: actor.id, station: ASSEMBLY_STATION };
    const year = clockNow().getUTCFullYear();
    const speakers = {} as Record<Side, Item>;
    const parts: Record<Side, Record<string, string>> = { L: {}, R: {} };
    for (const side of SIDES) {
      const cabinet = ctx.cabinets.find((c) => c.side === side)!.item;
      const speaker = await createItem(
        tx,
        {
          kind: "speaker",
          identity: await allocateSerial(tx, { kind: "speaker", code: ctx.model.code, year }),
          state: "in_assembly",
          modelId: ctx.model.id,
          finishId: pair.finishId,
          attrs: { side, pair: pair.identity },
        },
        by,
      );
      await removeFrom(tx, { parent: pair, child: cabinet, data: { speaker: speaker.identity } }, { ...by, reason: "built into its speaker" });
      await fit(tx, { parent: speaker, child: cabinet, position: SPEAKER_CABINET_POSITION }, by);
      parts[side][SPEAKER_CABINET_POSITION] = cabinet.identity;
      for (const slot of ctx.slots) {
        const part = picked.get(slotKey(side, slot.slot))!;
        await fit(tx, { parent: speaker, child: part, position: slot.slot }, by);
        const member = await openMembership(tx, part.id);
        if (member) {
          const eventId = await appendEvent(tx, {
            actorId: actor.id,
            station: ASSEMBLY_STATION,
            type: "set.member_fitted",
            subjectKind: "set",
            subjectId: member.setId,
            data: { code: member.code, unit: part.identity, side: member.side, speaker: speaker.identity, position: slot.slot, pair: pair.identity },
          });
          const ended = await tx
            .update(setMembers)
            .set({ endedAt: clockNow(), endEventId: eventId, endReason: "fitted" })
            .where(and(eq(setMembers.id, member.memberId), isNull(setMembers.endedAt)))
            .returning({ id: setMembers.id });
          if (ended.length !== 1) throw new AppError(409, `${part.identity}'s reservation ended a moment ago. Nothing was built; scan it again.`);
        }
        await changeState(tx, part, "fitted", by, { speaker: speaker.identity, position: slot.slot });
        parts[side][slot.slot] = part.identity;
      }
      await changeState(tx, speaker, "built", by);
      speakers[side] = speaker;
    }
    for (const side of SIDES) await fit(tx, { parent: pair, child: speakers[side], position: PAIR_SPEAKER_POSITION[side] }, by);
    await changeState(tx, pair, "awaiting_test", by);
    await appendEvent(tx, {
      actorId: actor.id,
      station: ASSEMBLY_STATION,
      type: "pair.assembled",
      subjectKind: "item",
      subjectId: pair.id,
      data: { identity: pair.identity, model: ctx.model.code, left: speakers.L.identity, right: speakers.R.identity, parts },
    });
    const note = input.inspection.note.trim();
    await appendEvent(tx, {
      actorId: actor.id,
      station: ASSEMBLY_STATION,
      type: "pair.inspected",
      subjectKind: "item",
      subjectId: pair.id,
      data: { identity: pair.identity, clean: true, inspected: true, note, speakers: [speakers.L.identity, speakers.R.identity] },
      reason: note || null,
    });
    return { pair, speakers };
  });
}
