/**
 * The cabinet route as people meet it: one minute for a hold in the refusal and on the page, an
 * out-of-window reading recorded only once confirmed, the workshop's day on the shop's home, and
 * the confirmation quality reads after a disposition. The route's windows and holds are the demo
 * workshop's default (common practice); time zone offsets are those of the IANA database.
 */
import { count, eq } from "drizzle-orm";
import { afterEach, beforeAll, describe, expect, test, vi } from "vitest";
import { getDb } from "@/db";
import { events, finishes, items, models, nonconformances, routeRecords, users } from "@/db/schema";
import { seedDemo } from "@/db/seed/seed";
import { setClock } from "@/lib/clock";
import { formatAllowedFrom } from "@/lib/format";
import { dispositionNc, dispositionSummary } from "@/lib/route/nonconformances";
import { OutOfWindowUnconfirmed, pairRoute, recordStep, recordedNotice } from "@/lib/route/pair-route";
import { nextStepNow } from "@/lib/route/rules";
import { shopBoard, shopPairs } from "@/lib/route/shop";
import { describeEvent } from "@/lib/events/describe";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { workshopDayEnd } from "@/lib/workshop-time";
import { goodReadings } from "../fixtures/route";
import { failureText } from "./helpers";

const db = () => getDb();
const ids: Record<"cabinet" | "quality" | "veneer", string> = { cabinet: "", quality: "", veneer: "" };
let model: typeof models.$inferSelect;

beforeAll(async () => {
  await seedDemo(db(), { history: false });
  for (const role of ["cabinet", "quality", "veneer"] as const) ids[role] = (await db().select().from(users).where(eq(users.email, `${role}@demo.twinleaf.test`)))[0]!.id;
  model = (await db().select().from(models)).find((m) => m.leavesPerFace === 2)!;
});
afterEach(() => {
  setClock(null);
  vi.unstubAllEnvs();
});

async function newPair() {
  const walnut = (await db().select().from(finishes)).find((f) => f.kind === "veneer")!;
  const flitch = await receiveFlitch(db(), { finishId: walnut.id, logReference: "R", supplier: "S", receivedOn: "2026-11-01", leafThicknessMm: 0.6, leafCount: 4 }, { id: ids.veneer });
  const view = (await flitchView(db(), flitch.identity))!;
  for (const l of view.leaves) await measureLeaf(db(), l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: ids.veneer });
  const [made] = await confirmRuns(db(), { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: ids.veneer });
  return made!.pair;
}

async function step(pairId: string, seq: number, when: Date, readings?: Record<string, string | boolean>, confirmOutOfWindow?: string) {
  setClock(when);
  const pair = (await db().select().from(items).where(eq(items.id, pairId)))[0]!;
  const s = (await pairRoute(db(), pair, when)).spec.steps.find((x) => x.seq === seq)!;
  return recordStep(db(), { pairId, seq, sides: ["L", "R"], startedAt: when, readings: readings ?? goodReadings(s.key), confirmOutOfWindow }, { id: ids.cabinet });
}

const rowCount = async (pairId: string) => ({
  records: (await db().select({ n: count() }).from(routeRecords).where(eq(routeRecords.pairId, pairId)))[0]!.n,
  ncs: (await db().select({ n: count() }).from(nonconformances).where(eq(nonconformances.pairId, pairId)))[0]!.n,
  events: (await db().select({ n: count() }).from(events))[0]!.n,
});

describe("an out-of-window reading is asked about once, and recorded only when confirmed", () => {
  test("unconfirmed: the question, and nothing written; confirmed for another value: asked again; confirmed: recorded with its nonconformance", async () => {
    const pair = await newPair();
    const T0 = new Date("2026-12-07T08:00:00Z");
    const before = await rowCount(pair.id);
    const asked = await step(pair.id, 1, T0, { platenC: "141", minutes: "22" }).catch((e: unknown) => e);
    expect(asked).toBeInstanceOf(OutOfWindowUnconfirmed);
    const e = asked as OutOfWindowUnconfirmed;
    expect(e.message).toBe("Platen temperature 141 °C is outside 135–140 °C: record it and open a nonconformance?");
    expect(e.confirmation).toBe("platenC=141");
    expect(e.fieldErrors).toEqual({ platenC: ["Out of its window (135–140 °C)."] });
    expect(await rowCount(pair.id)).toEqual(before);

    // The reading was changed after the question: the old answer does not cover it.
    await expect(step(pair.id, 1, T0, { platenC: "142", minutes: "22" }, "platenC=141")).rejects.toBeInstanceOf(OutOfWindowUnconfirmed);
    expect(await rowCount(pair.id)).toEqual(before);

    const done = await step(pair.id, 1, T0, { platenC: "141", minutes: "22" }, "platenC=141");
    expect(done.nc).toMatch(/^NC-2612-\d{3}$/);
    const after = await rowCount(pair.id);
    expect([after.records, after.ncs]).toEqual([before.records + 1, before.ncs + 1]);
    const route = await pairRoute(db(), pair, T0);
    expect(recordedNotice(route, done.recordId)).toEqual({
      text: `Recorded step 1, Forming press, for the left and right cabinets. A reading was out of its window: nonconformance ${done.nc} holds the pair until quality dispositions it.`,
      nc: done.nc,
    });
  });

  test("readings inside their windows need no confirmation", async () => {
    const pair = await newPair();
    await expect(step(pair.id, 1, new Date("2026-12-07T08:00:00Z"))).resolves.toMatchObject({ nc: null });
  });

  test("a nonconformance's code carries the workshop's month: 23:30 UTC on 31 December is January in Berlin", async () => {
    vi.stubEnv("TWINLEAF_TIME_ZONE", "Europe/Berlin");
    const pair = await newPair();
    const done = await step(pair.id, 1, new Date("2026-12-31T23:30:00Z"), { platenC: "150", minutes: "22" }, "platenC=150");
    expect(done.nc).toMatch(/^NC-2701-\d{3}$/);
  });
});

describe("one minute for a hold: the refusal and the page's caution agree", () => {
  test("brace fitting started at 09:00:31: the caution, the refusal, the hold on the card and the shop's home all say 13:01", async () => {
    const pair = await newPair();
    await step(pair.id, 1, new Date("2026-12-07T07:00:00Z"));
    await step(pair.id, 2, new Date("2026-12-07T08:00:00Z"));
    // 2 h under clamp and 2 h at rest from 09:00:31 releases at 13:00:31: allowed from 13:01.
    await step(pair.id, 3, new Date("2026-12-07T09:00:31Z"));
    const now = new Date("2026-12-07T12:30:00Z");
    const route = await pairRoute(db(), pair, now);
    const caution = nextStepNow(route.spec.steps, route.history, route.cabinets.map((c) => c.side), now);
    expect(caution.ready).toEqual([]);
    const refusal = await failureText(() => step(pair.id, 4, now));
    expect(caution.blocked?.reason).toBe(refusal);
    expect(refusal).toBe("Not before 13:01 on 7 Dec (UTC): the left and right cabinets are on hold (clamp 2 h and rest 2 h) until then.");
    expect(formatAllowedFrom(route.position.cabinets[0]!.holdUntil!, now)).toBe("13:01 on 7 Dec (UTC)");
    const shop = (await shopPairs(db(), now)).find((p) => p.pair === pair.identity)!;
    expect(formatAllowedFrom(shop.holdUntil!, now)).toBe("13:01 on 7 Dec (UTC)");

    // A second before the minute shown it is still refused; at the minute it is allowed.
    await expect(step(pair.id, 4, new Date("2026-12-07T13:00:59Z"))).rejects.toThrow(/Not before 13:01/);
    await expect(step(pair.id, 4, new Date("2026-12-07T13:01:00Z"))).resolves.toMatchObject({ nc: null });
  });

  test("in the workshop's own zone: the same hold reads 14:01 in Berlin", async () => {
    vi.stubEnv("TWINLEAF_TIME_ZONE", "Europe/Berlin");
    const pair = await newPair();
    await step(pair.id, 1, new Date("2026-12-08T07:00:00Z"));
    await step(pair.id, 2, new Date("2026-12-08T08:00:00Z"));
    await step(pair.id, 3, new Date("2026-12-08T09:00:31Z"));
    const now = new Date("2026-12-08T12:30:00Z");
    const route = await pairRoute(db(), pair, now);
    const caution = nextStepNow(route.spec.steps, route.history, route.cabinets.map((c) => c.side), now);
    const refusal = await failureText(() => step(pair.id, 4, now));
    expect(caution.blocked?.reason).toBe(refusal);
    expect(refusal).toMatch(/^Not before 14:01 on 8 Dec \(Europe\/Berlin\):/);
  });

  test("the shop's home: a hold that ends at 23:30 UTC releases today in London, tomorrow in Berlin", async () => {
    const pair = await newPair();
    await step(pair.id, 1, new Date("2026-12-09T17:00:00Z"));
    await step(pair.id, 2, new Date("2026-12-09T18:00:00Z"));
    await step(pair.id, 3, new Date("2026-12-09T19:30:00Z"));
    const at = new Date("2026-12-09T20:00:00Z");
    const pairs = (await shopPairs(db(), at)).filter((p) => p.pair === pair.identity);
    const today = (zone: string) => {
      vi.stubEnv("TWINLEAF_TIME_ZONE", zone);
      return shopBoard(pairs, at, workshopDayEnd(at)).releasingToday.map((p) => p.pair);
    };
    expect(today("Europe/London")).toEqual([pair.identity]);
    expect(today("Europe/Berlin")).toEqual([]);
  });

  test("a pair whose hold ran out is waiting since the hold's minute, not since the step before it", async () => {
    const pair = await newPair();
    await step(pair.id, 1, new Date("2026-12-10T07:00:00Z"));
    await step(pair.id, 2, new Date("2026-12-10T08:00:00Z"));
    await step(pair.id, 3, new Date("2026-12-10T09:00:31Z"));
    const later = new Date("2026-12-13T09:00:00Z");
    const shop = (await shopPairs(db(), later)).find((p) => p.pair === pair.identity)!;
    expect(shop.readySince?.toISOString()).toBe("2026-12-10T13:01:00.000Z");
    expect(shopBoard([shop], later, workshopDayEnd(later)).overdue.map((p) => p.pair)).toEqual([pair.identity]);
  });
});

describe("after a disposition, quality reads what was recorded", () => {
  async function openNc(readings: Record<string, string>, confirm: string, toTrim = false) {
    const pair = await newPair();
    if (toTrim) await step(pair.id, 1, new Date("2026-12-11T07:00:00Z"));
    const seq = toTrim ? 2 : 1;
    const { nc } = await step(pair.id, seq, new Date("2026-12-11T08:00:00Z"), readings, confirm);
    const [row] = await db().select().from(nonconformances).where(eq(nonconformances.code, nc!));
    return { pair, row: row! };
  }

  test("rework back to a named step: the pair is released", async () => {
    const { pair, row } = await openNc({ deviationMm: "0.3" }, "deviationMm=0.3", true);
    const out = await dispositionNc(db(), { ncId: row.id, disposition: "rework", reworkToSeq: 2, reason: "retrim the front edge" }, { id: ids.quality });
    expect(out).toEqual({ code: row.code });
    expect(await dispositionSummary(db(), row.code)).toBe(`${row.code}: rework back to step 2, Trimming. The pair is released.`);
    expect(await dispositionSummary(db(), row.code, { pairId: pair.id })).not.toBeNull();
    // Another pair's page does not show it.
    expect(await dispositionSummary(db(), row.code, { pairId: "another" })).toBeNull();
  });

  test("use as is, and scrap one cabinet", async () => {
    const a = await openNc({ platenC: "141", minutes: "22" }, "platenC=141");
    await dispositionNc(db(), { ncId: a.row.id, disposition: "use_as_is", reason: "1 °C over briefly; bond sound" }, { id: ids.quality });
    expect(await dispositionSummary(db(), a.row.code)).toBe(`${a.row.code}: use as is (deviation approved). The pair is released.`);

    const b = await openNc({ platenC: "152", minutes: "22" }, "platenC=152");
    const right = (await pairRoute(db(), b.pair)).cabinets.find((c) => c.side === "R")!.item.identity;
    await dispositionNc(db(), { ncId: b.row.id, disposition: "scrap", scrapSide: "R", reason: "veneer blistered" }, { id: ids.quality });
    expect(await dispositionSummary(db(), b.row.code)).toBe(`${b.row.code}: scrap the right cabinet ${right}. The pair is unpartnered until quality signs off a new partner.`);
  });

  test("an open nonconformance has no confirmation to show", async () => {
    const { row } = await openNc({ platenC: "134", minutes: "22" }, "platenC=134");
    expect(await dispositionSummary(db(), row.code)).toBeNull();
    expect(await dispositionSummary(db(), "NC-0000-000")).toBeNull();
  });

  test("the event log names the step and the decision", async () => {
    const { pair, row } = await openNc({ deviationMm: "0.3" }, "deviationMm=0.3", true);
    await dispositionNc(db(), { ncId: row.id, disposition: "rework", reworkToSeq: 1, reason: "press again" }, { id: ids.quality });
    const logged = await db().select().from(events).where(eq(events.subjectId, pair.id));
    const phrases = logged.filter((e) => e.type.startsWith("nc.")).map((e) => describeEvent(e.type, e.data));
    expect(phrases).toEqual([`opened nonconformance ${row.code} at step 2, Trimming: ${row.finding}`, `decided nonconformance ${row.code}: rework back to step 1`]);
  });
});
