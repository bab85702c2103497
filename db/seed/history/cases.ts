/**
 * The service desk's open and recent cases, written through the desk's own functions (intake,
 * findings, moves, the quote, the reservation and fit of a replacement, the re-test, the way home)
 * at their invented moments: one in warranty waiting for a part, one out of warranty waiting for
 * payment (its quote recorded; the payment link needs the payment service, so the desk moves it on
 * by hand), one repaired and re-tested with its revised certificate, one sent back and closed, and
 * two just in. The owners here have not agreed to be contacted, so no demo message is sent.
 */
import { and, eq } from "drizzle-orm";
import { finalTests, responses } from "@/db/schema";
import { workshopDay } from "@/lib/workshop-time";
import { createQuote } from "@/lib/payments/quotes";
import { changeCaseState, recordFinding } from "@/lib/service/desk";
import { openCase } from "@/lib/service/intake";
import { fitReplacement, markRepaired } from "@/lib/service/repair";
import { replacementView, reserveReplacement } from "@/lib/service/replacements";
import { retestCase } from "@/lib/service/retest";
import { caseByCode } from "@/lib/service/queries";
import { sendCaseBack } from "@/lib/service/return";
import { DAY, HOUR, plus, workday, type Rng } from "./basics";
import { got, type Ctx, type PairPlan, type Plan } from "./plan";

/** Invented owners who brought a speaker back; none has agreed to be contacted (demo). */
const RETURNERS = [
  { name: "Oswin Threlkeld", email: "oswin.threlkeld@post.test", town: "Ashcombe Parva", country: "GB" },
  { name: "Rosamund Ivesley", email: "r.ivesley@mail.test", town: "Kettering Dale", country: "GB" },
  { name: "Gaspard Lenormand", email: "gaspard.lenormand@courriel.test", town: "Saint-Aubrac", country: "FR" },
  { name: "Wiebke Sanddorn", email: "wiebke.sanddorn@post.test", town: "Lindenhagen", country: "DE" },
  { name: "Torvald Hesjedal", email: "torvald.hesjedal@epost.test", town: "Fjellstrand", country: "NO" },
  { name: "Philippa Crane-Ashby", email: "philippa.crane-ashby@post.test", town: "Wendlebury", country: "GB" },
];

type Step = "received" | "diagnosed" | "waiting_part" | "waiting_payment" | "tested" | "closed";

/** The pair's passing final test, as the two response files the lab read (frequency and level per line). */
async function finalTestFiles(ctx: Ctx, pairId: string) {
  const [t] = await ctx.db.select().from(finalTests).where(and(eq(finalTests.pairId, pairId), eq(finalTests.pass, true))).limit(1);
  if (!t) throw new Error("history seed: the pair to re-test has no passing final test");
  const file = async (id: number, name: string) => {
    const [r] = await ctx.db.select({ points: responses.points }).from(responses).where(eq(responses.id, id));
    return { name, text: ["Freq SPL", ...r!.points.map(([hz, db]) => `${hz} ${db}`)].join("\n") };
  };
  return { left: await file(t.leftResponseId, "left.txt"), right: await file(t.rightResponseId, "right.txt") };
}

/**
 * Plans the demo's cases on shipped pairs with a tweeter, none of them the pair the history
 * already repaired. `outOfWarranty` pairs shipped longer ago than their model's period.
 */
export function planCases(plan: Plan, rng: Rng, pairs: PairPlan[], repaired: PairPlan | null, now: Date): void {
  const shipped = pairs.filter((p) => p !== repaired && p.shippedAt && p.model.positions.some((x) => x.position === "T"));
  const recent = shipped.filter((p) => p.shippedAt!.getTime() > now.getTime() - 300 * DAY && p.shippedAt!.getTime() < now.getTime() - 40 * DAY);
  const old = shipped.filter((p) => p.shippedAt!.getTime() < now.getTime() - (p.model.warrantyMonths * 30.5 + 30) * DAY);
  const taken = new Set<string>();
  const pick = (from: PairPlan[]) => {
    const left = from.filter((p) => !taken.has(p.key));
    if (left.length === 0) return null;
    const p = rng.pick(left);
    taken.add(p.key);
    return p;
  };
  const stories: { from: PairPlan[]; step: Step; daysAgo: number; symptom: string }[] = [
    { from: recent, step: "waiting_part", daysAgo: 12, symptom: "The tweeter crackles at moderate volume, then goes quiet." },
    { from: old, step: "waiting_payment", daysAgo: 9, symptom: "No treble from this speaker since a house move." },
    { from: recent, step: "tested", daysAgo: 20, symptom: "Treble sounds dull next to the other speaker." },
    { from: recent, step: "closed", daysAgo: 34, symptom: "A buzz from the tweeter on piano notes." },
    { from: recent, step: "diagnosed", daysAgo: 5, symptom: "Intermittent loss of treble when warm." },
    { from: shipped, step: "received", daysAgo: 3, symptom: "The owner reports a rattle; no fault found on a first listen." },
  ];
  stories.forEach((story, i) => {
    const p = pick(story.from);
    if (!p) return;
    const side = rng.pick(["L", "R"] as const);
    const owner = RETURNERS[i % RETURNERS.length]!;
    const desk = (ctx: Ctx) => ctx.ref.actors.service;
    const opened = workday(now, -story.daysAgo, 9);
    const codeKey = `case:${p.key}`;
    const code = (ctx: Ctx) => String(ctx.notes.get(codeKey));
    plan.add(opened, `the return of ${p.key}:${side}`, async (ctx) => {
      const speaker = got(ctx, `${p.key}:spk:${side}`);
      const r = await openCase(ctx.db, { serial: speaker.identity, symptom: story.symptom, returnedBy: "owner", owner: { ...owner, consent: false }, receivedOn: workshopDay(opened) }, desk(ctx));
      ctx.notes.set(codeKey, r.case.code);
    });
    if (story.step === "received") return;
    plan.add(plus(opened, 2 * HOUR), `the diagnosis of ${p.key}`, async (ctx) => {
      await recordFinding(ctx.db, { code: code(ctx), side, position: "T", finding: "Tweeter voice coil open circuit; no output above 3 kHz." }, desk(ctx));
      await changeCaseState(ctx.db, { code: code(ctx), to: "diagnosed" }, desk(ctx));
    });
    if (story.step === "diagnosed") return;
    if (story.step === "waiting_part") {
      plan.add(plus(opened, 3 * HOUR), `${p.key} waiting for a tweeter`, async (ctx) => {
        await changeCaseState(ctx.db, { code: code(ctx), to: "waiting_part", reason: "No stock tweeter matches the surviving one closely enough; a new batch is on order." }, desk(ctx));
      });
      return;
    }
    if (story.step === "waiting_payment") {
      plan.add(plus(opened, 3 * HOUR), `the quote for ${p.key}`, async (ctx) => {
        const c = await openCaseOf(ctx, code(ctx));
        await createQuote(ctx.db, { caseId: c, lines: [
          { kind: "part", description: "Tweeter, measured and matched to the surviving one", quantity: "1", unitPrice: "145.00" },
          { kind: "labour", description: "Bench work and re-test of the pair, one and a half hours", quantity: "1", unitPrice: "90.00" },
        ] }, desk(ctx));
        await changeCaseState(ctx.db, { code: code(ctx), to: "waiting_payment" }, desk(ctx));
      });
      return;
    }
    // Repaired from stock two days in, late in the day: the lab measures its batches in the
    // morning, and a unit is fitted only once its Thiele–Small parameters are in. Re-tested next day.
    const repairAt = workday(opened, 2, 17);
    plan.add(repairAt, `the repair of ${p.key}`, async (ctx) => {
      const view = await replacementView(ctx.db, { code: code(ctx), side, position: "T" });
      const best = view.candidates[0];
      if (!best) throw new Error(`history seed: no stock tweeter matches the survivor in ${p.key}`);
      await reserveReplacement(ctx.db, { code: code(ctx), side, position: "T", serial: best.id }, desk(ctx));
      await fitReplacement(ctx.db, { code: code(ctx), side, position: "T", disposition: "failed", reason: "Voice coil open circuit." }, desk(ctx));
      await markRepaired(ctx.db, { code: code(ctx) }, desk(ctx));
    });
    plan.add(workday(repairAt, 1, 11), `the re-test of ${p.key}`, async (ctx) => {
      const files = await finalTestFiles(ctx, got(ctx, p.key).id);
      const r = await retestCase(ctx.db, { code: code(ctx), ...files }, desk(ctx));
      if (!r.revision) throw new Error(`history seed: the re-test of ${p.key} failed`);
    });
    if (story.step === "tested") return;
    const left = workday(repairAt, 2, 15);
    const tracking = `FW ${rng.int(100000, 999999)}`;
    plan.add(left, `${p.key} sent back`, async (ctx) => {
      await sendCaseBack(ctx.db, { code: code(ctx), to: "dealer", shippedOn: workshopDay(left), carrier: "Fernway Freight", tracking }, desk(ctx));
    });
    plan.add(workday(repairAt, 7, 10), `${p.key} closed`, async (ctx) => {
      await changeCaseState(ctx.db, { code: code(ctx), to: "closed", reason: "The dealer confirmed delivery." }, desk(ctx));
    });
  });
}

async function openCaseOf(ctx: Ctx, code: string): Promise<string> {
  const c = await caseByCode(ctx.db, code);
  if (!c) throw new Error(`history seed: case ${code} is not on record`);
  return c.id;
}
