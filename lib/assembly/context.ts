/** The assembly station's view of one pair: its model, slots, cabinets, route and what blocks it. */
import "server-only";
import { and, eq, inArray, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finishes, items, links, models, type Finish, type Item, type Model } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { holdMessage, holdsOn, type Hold } from "@/lib/containments/holds";
import { pairRoute, type PairRoute } from "@/lib/route/pair-route";
import { stateLabel } from "@/lib/vocabulary/item-kinds";
import { PAIR_CABINET_POSITION as CAB_POSITION, PAIR_SPEAKER_POSITION } from "@/lib/vocabulary/positions";
import { SIDES, sideWord, type Side } from "@/lib/vocabulary/sides";
import { slotsOf, type Slot } from "./slots";
import { modelSpecOf } from "@/lib/workshop/model-spec-of";
import type { PartType } from "@/lib/vocabulary/part-types";

export // ---- the pair at the station --------------------------------------------------------------------

interface PairContext {
  pair: Item;
  model: Model;
  finish: Finish | null;
  slots: Slot[];
  /** The drive-unit positions of the model version the pair was started under. */
  positions: { position: string; partType: PartType; count: number }[];
  route: PairRoute | null;
  cabinets: { side: Side; item: Item }[];
  speakers: { side: Side; item: Item }[];
  /** Paired here from two finished lacquer cabinets (they have no route records of their own). */
  lacquer: boolean;
  routeFinished: boolean;
  /** The next step of the route in words, while it is not finished. */
  next: string | null;
  openNcs: { code: string; finding: string }[];
  /** Open containments holding the pair, a cabinet of it or a part in it. */
  holds: Hold[];
  /** Why nothing can be fitted into this pair now, or null when it is ready. */
  blocked: string | null;
}

export async function pairContext(db: DbOrTx, pair: Item, at: Date = clockNow()): Promise<PairContext> {
  if (pair.kind !== "pair" || !pair.modelId) throw new AppError(400, `${pair.identity} is not a pair of a model.`);
  const [model] = await db.select().from(models).where(eq(models.id, pair.modelId)).limit(1);
  const [finish] = pair.finishId ? await db.select().from(finishes).where(eq(finishes.id, pair.finishId)).limit(1) : [];
  // The drive-unit and trim positions of the model version the pair was started under, not a later edit's.
  const spec = await modelSpecOf(db, pair);
  const positions = spec?.positions ?? [];
  const slots = slotsOf(positions, spec?.trimPositions ?? []);
  let route: PairRoute | null = null;
  let routeProblem: string | null = null;
  try {
    route = await pairRoute(db, pair, at);
  } catch (e) {
    if (!(e instanceof AppError)) throw e;
    routeProblem = e.message;
  }
  const held = await db
    .select({ item: items, position: links.position })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, pair.id), isNull(links.endedAt), inArray(links.position, [CAB_POSITION.L, CAB_POSITION.R, PAIR_SPEAKER_POSITION.L, PAIR_SPEAKER_POSITION.R])));
  const cabinets = held.filter((h) => h.position.startsWith("CAB-")).map((h) => ({ side: (h.position === CAB_POSITION.L ? "L" : "R") as Side, item: h.item })).sort((a, b) => a.side.localeCompare(b.side));
  const speakers = held.filter((h) => h.item.kind === "speaker").map((h) => ({ side: h.position as Side, item: h.item })).sort((a, b) => a.side.localeCompare(b.side));
  const lacquer = pair.attrs?.pairedAt === "assembly";
  const openNcs = (route?.ncs ?? []).filter((n) => !n.disposition).map((n) => ({ code: n.code, finding: n.finding }));

  // A lacquer pair made here was two finished cabinets when it was paired; the route of unpaired
  // lacquer cabinets is recorded outside the register for now, so their state is what says so.
  const lacquerDone = lacquer && (route?.records.length ?? 0) === 0 && cabinets.length === 2 && cabinets.every((c) => c.item.state === "finished");
  const routeFinished = Boolean(route && cabinets.length === 2 && (route.position.finished || lacquerDone));
  let next: string | null = null;
  if (route && !routeFinished) {
    const pending = route.position.cabinets.filter((c) => c.next);
    const first = pending.sort((a, b) => a.next!.seq - b.next!.seq)[0];
    if (first) {
      const sides = pending.filter((c) => c.next!.seq === first.next!.seq).map((c) => c.side);
      next = `${first.next!.seq}, ${first.next!.name}${sides.length === 1 && cabinets.length === 2 ? ` (${sideWord(sides[0]!)} cabinet)` : ""}`;
    } else if (lacquer) {
      next = cabinets
        .filter((c) => c.item.state !== "finished")
        .map((c) => `${c.item.identity} is ${stateLabel(c.item.state)}`)
        .join("; ");
    }
  }

  const holds = await holdsOn(db, [pair.id]);
  let blocked: string | null = null;
  if (speakers.length) blocked = `${pair.identity} is built already: its speakers are ${speakers.map((s) => s.item.identity).join(" and ")}.`;
  else if (holds[0]) blocked = holdMessage(holds[0], pair.identity, "be built into speakers");
  else if (pair.state === "unpartnered") blocked = `${pair.identity} is unpartnered: it lost a cabinet, and quality signs off a new partner before it is assembled.`;
  else if (pair.state !== "in_production") blocked = `${pair.identity} is ${stateLabel(pair.state)}: only a pair in production is built into speakers.`;
  else if (routeProblem) blocked = routeProblem;
  else if (cabinets.length < 2) blocked = `${pair.identity} has no ${SIDES.filter((s) => !cabinets.some((c) => c.side === s)).map(sideWord).join(" or ")} cabinet now.`;
  else if (openNcs.length) blocked = `${pair.identity} is on hold: ${openNcs.map((n) => `${n.code} (${n.finding})`).join("; ")} is open. Quality dispositions it before assembly.`;
  else if (cabinets.some((c) => c.item.state === "scrapped")) blocked = `${pair.identity} holds a scrapped cabinet.`;
  else if (!routeFinished) blocked = `The cabinets have not finished their route: next step is ${next ?? "not known"}.`;

  return { pair, model: model!, finish: finish ?? null, slots, positions, route, cabinets, speakers, lacquer, routeFinished, next, openNcs, holds, blocked };
}
