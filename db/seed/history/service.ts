/**
 * The service desk: one tweeter that went silent about a year after shipping, replaced by a stock
 * tweeter that still matches the surviving one (ranked with lib/matching `rankReplacements`), the
 * repair recorded through the genealogy (`removeFrom`, `fit`, `changeState`) and its note corrected
 * a week later; and the owners who registered their pairs (lib/owners `registerOwnership`).
 */
import { and, eq, gt, lt, sql } from "drizzle-orm";
import { items, responses } from "@/db/schema";
import { bandLevels, thirdOctaveBands } from "@/lib/acoustics";
import { appendEvent } from "@/lib/events/queries";
import { changeState, fit, itemById, itemByIdentity, removeFrom, type Recorder } from "@/lib/genealogy/graph";
import { PASSBANDS } from "@/lib/lab/units";
import { rankReplacements } from "@/lib/matching";
import { registerOwnership } from "@/lib/owners";
import { DAY, MIN, plus, workday, type Rng } from "./basics";
import { got, type Ctx, type PairPlan, type Plan } from "./plan";

const FAILURE_REASON = "no output above 3 kHz";

/** Invented owners in invented towns; each registers pairs sold by a dealer in their country. */
const OWNERS: { name: string; email: string; town: string; country: string; pairs: number }[] = [
  { name: "Edwin Marlowe-Pike", email: "edwin.marlowe-pike@post.test", town: "Thistlecombe", country: "GB", pairs: 2 },
  { name: "Harriet Quenneville", email: "h.quenneville@mail.test", town: "Pellingford", country: "GB", pairs: 1 },
  { name: "Callum Ardrossey", email: "callum@ardrossey.test", town: "Merrowby", country: "GB", pairs: 1 },
  { name: "Ines Vautrin", email: "ines.vautrin@courriel.test", town: "Montcellier-la-Haute", country: "FR", pairs: 1 },
  { name: "Mathilde Roussel-Garnier", email: "m.roussel-garnier@courriel.test", town: "Vaudrey-sur-Lenne", country: "FR", pairs: 2 },
  { name: "Clara Weidenfeld", email: "clara.weidenfeld@post.test", town: "Brunnwiesen", country: "DE", pairs: 1 },
  { name: "Lukas Treuhaft", email: "lukas.treuhaft@mail.test", town: "Haselstedt", country: "DE", pairs: 2 },
  { name: "Birte Ahlgren-Voss", email: "birte.ahlgren-voss@post.test", town: "Kestelbrück", country: "DE", pairs: 1 },
  { name: "Henrik Solbakk", email: "henrik.solbakk@epost.test", town: "Brattvik", country: "NO", pairs: 1 },
  { name: "Ingrid Tveitmoen", email: "ingrid.tveitmoen@epost.test", town: "Eikelund", country: "NO", pairs: 1 },
];

const levels = (points: number[][]) => bandLevels(points.map(([hz, db]) => ({ hz: hz!, db: db! })), thirdOctaveBands(PASSBANDS.tweeter.minHz, PASSBANDS.tweeter.maxHz));

/**
 * The stock tweeter closest to the survivor within the model's limit: measured, in no set, and
 * registered after the failed one was fitted and at least a week before the repair.
 */
async function replacementFor(ctx: Ctx, survivorId: string, since: Date, before: Date, limitDb: number) {
  const newest = sql`${responses.id} = (SELECT max(r2.id) FROM responses r2 WHERE r2.item_id = ${responses.itemId} AND r2.purpose = 'unit')`;
  const [survivor] = await ctx.db.select({ points: responses.points }).from(responses).where(and(eq(responses.itemId, survivorId), newest));
  const stock = await ctx.db
    .select({ id: items.identity, points: responses.points })
    .from(items)
    .innerJoin(responses, eq(responses.itemId, items.id))
    .where(and(eq(items.kind, "drive_unit"), eq(items.partType, "tweeter"), eq(items.state, "measured"), gt(items.createdAt, since), lt(items.createdAt, before), newest))
    .orderBy(items.identity);
  if (!survivor) throw new Error("history seed: the surviving tweeter has no response");
  const ranked = rankReplacements({ id: "survivor", levels: levels(survivor.points) }, stock.map((s) => ({ id: s.id, levels: levels(s.points) })), { limitDb });
  if (!ranked[0]) throw new Error("history seed: no stock tweeter matches the surviving one");
  return (await itemByIdentity(ctx.db, ranked[0].id))!;
}

/** A tweeter that went silent about a year after shipping, replaced from stock by the service desk. */
export function planRepair(plan: Plan, rng: Rng, pairs: PairPlan[], now: Date): PairPlan | null {
  const candidates = pairs.filter((p) => p.shippedAt && p.shippedAt.getTime() < now.getTime() - 420 * DAY && p.model.positions.some((x) => x.position === "T"));
  if (candidates.length === 0) return null;
  const p = rng.pick(candidates);
  const side = rng.pick(["L", "R"] as const);
  const returned = workday(p.shippedAt!, rng.int(330, 380), 10);
  const repaired = workday(returned, 3, 14);
  const corrected = workday(repaired, 6, 9);
  const spk = `${p.key}:spk:${side}`;
  const by = (ctx: Ctx, reason: string | null = null): Recorder => ({ actorId: ctx.ref.actors.service.id, station: "service", reason });

  plan.add(returned, `the return of ${spk}`, async (ctx) => {
    await ctx.db.transaction(async (tx) => changeState(tx, (await itemById(tx, got(ctx, spk).id))!, "returned", by(ctx, "Came back from its owner: no treble from this speaker.")));
  });
  plan.add(repaired, `the repair of ${spk}`, async (ctx) => {
    const failed = (await itemByIdentity(ctx.db, String(ctx.notes.get(`${p.key}:unit:${side}:T`))))!;
    const survivor = (await itemByIdentity(ctx.db, String(ctx.notes.get(`${p.key}:unit:${side === "L" ? "R" : "L"}:T`))))!;
    const replacement = await replacementFor(ctx, survivor.id, p.t.assembly, plus(returned, -7 * DAY), p.model.limits.tweeter!);
    await ctx.db.transaction(async (tx) => {
      const speaker = (await itemById(tx, got(ctx, spk).id))!;
      const removal = await removeFrom(tx, { parent: speaker, child: failed }, { ...by(ctx), reason: FAILURE_REASON });
      ctx.notes.set("repair.removal", removal.eventId);
      await changeState(tx, failed, "failed", by(ctx, FAILURE_REASON));
      await fit(tx, { parent: speaker, child: replacement, position: "T", data: { replaces: failed.identity } }, by(ctx));
      await changeState(tx, replacement, "fitted", by(ctx), { speaker: speaker.identity, position: "T" });
    });
  });
  plan.add(plus(repaired, DAY), `${spk} repaired`, async (ctx) => {
    await ctx.db.transaction(async (tx) => changeState(tx, (await itemById(tx, got(ctx, spk).id))!, "repaired", by(ctx)));
  });
  // The bench found more than the first note said: a correction names the event it corrects.
  plan.add(corrected, `correcting the repair note of ${spk}`, async (ctx) => {
    const failed = (await itemByIdentity(ctx.db, String(ctx.notes.get(`${p.key}:unit:${side}:T`))))!;
    await ctx.db.transaction((tx) =>
      appendEvent(tx, {
        actorId: ctx.ref.actors.service.id,
        station: "service",
        type: "event.corrected",
        subjectKind: "item",
        subjectId: failed.id,
        correctsId: Number(ctx.notes.get("repair.removal")),
        reason: "Bench measurement added: the voice coil is open circuit, so the removal note was incomplete.",
        data: { identity: failed.identity, field: "reason", from: FAILURE_REASON, to: `${FAILURE_REASON}; voice coil open circuit` },
      }),
    );
  });
  return p;
}

/** Owners register their pairs two weeks to a couple of months after the dealer received them; the repaired pair's owner among them. */
export function planOwners(plan: Plan, rng: Rng, pairs: PairPlan[], repaired: PairPlan | null, now: Date): void {
  const taken = new Set<string>();
  const pool = pairs.filter((p) => p.shippedAt && p.shippedAt.getTime() < now.getTime() - 90 * DAY);
  for (const owner of OWNERS) {
    const mine: PairPlan[] = [];
    if (repaired && !taken.has(repaired.key) && repaired.dealer.country === owner.country) mine.push(repaired);
    const rest = pool.filter((p) => p.dealer.country === owner.country && !taken.has(p.key) && p !== repaired);
    while (mine.length < owner.pairs && rest.length > 0) mine.push(rest.splice(rng.int(0, rest.length - 1), 1)[0]!);
    for (const p of mine) {
      taken.add(p.key);
      const since = plus(workday(p.shippedAt!, rng.int(14, 75), 10), rng.int(0, 90) * MIN);
      if (since > now) continue;
      const { pairs: _n, ...details } = owner;
      plan.add(since, `${owner.name} registering ${p.key}`, async (ctx) => {
        await registerOwnership(ctx.db, { pairId: got(ctx, p.key).id, owner: details }, ctx.ref.actors.service);
      });
    }
  }
}
