import "server-only";
import { nextNcCode } from "@/lib/route/nc-codes";
import { and, desc, eq, inArray } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { finalTests, items, models, nonconformances, responses, type Item } from "@/db/schema";
import { bandLabel, compareResponses, formatDb, formatLimitDb, parseResponseFile, type ResponseComparison } from "@/lib/acoustics";
import { AppError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now as clockNow } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import { changeState, itemByIdentity } from "@/lib/genealogy/graph";
import { speakersOf } from "@/lib/genealogy/pair-speakers";
import { parseSerial } from "@/lib/serials/format";
import { modelSpecOf } from "@/lib/workshop/model-spec-of";
import type { Station } from "@/lib/vocabulary/stations";

/** Pairs built and waiting for their final test. */
export const AWAITING_TEST = "awaiting_test";
/** The state a pair takes when its final test passes (or quality accepts a deviation). */
export const READY_TO_PACK = "ready_to_pack";

type ResponseFile = { name: string; text: string };
type TestModel = Pick<typeof models.$inferSelect, "responseMinHz" | "responseMaxHz" | "pairResponseLimitDb">;

/**
 * Reads the left and right final responses and compares them under the acceptance rule: |L − R|
 * per one-third-octave band over the model's range against its limit (lib/acoustics
 * `compareResponses`; a band exactly at the limit passes). Writes nothing; bad files are refused
 * with their lines named. Shared by the lab's final test and the service desk's re-test.
 */
export function readPairTest(model: TestModel, files: { left: ResponseFile; right: ResponseFile }) {
  const problems: string[] = [];
  const parse = (side: string, f: ResponseFile) => {
    const r = parseResponseFile(f.text, { name: f.name });
    if (!r.ok) for (const e of r.errors.slice(0, 8)) problems.push(`${side} (${f.name}), line ${e.line}: ${e.message}`);
    return r.ok ? r.points : null;
  };
  const left = parse("Left", files.left);
  const right = parse("Right", files.right);
  if (problems.length || !left || !right) throw new AppError(400, "Nothing was saved: the response files need attention.", { files: problems });
  try {
    return { left, right, comparison: compareResponses(left, right, { minHz: model.responseMinHz, maxHz: model.responseMaxHz, limitDb: model.pairResponseLimitDb }) };
  } catch (e) {
    throw new AppError(400, `Nothing was saved: ${(e as Error).message}`);
  }
}

/**
 * Records a pair test read by `readPairTest`, in the caller's transaction: each speaker's final
 * response, "pair.final_tested" with the figures, and the `final_tests` row. `data` is added to
 * each event (the service desk names its case).
 */
export async function recordPairTest(
  tx: DbOrTx,
  input: { pair: Item; model: TestModel; files: { left: ResponseFile; right: ResponseFile }; read: ReturnType<typeof readPairTest>; station: Station; data?: Record<string, unknown>; at: Date },
  actor: { id: string },
) {
  const { pair, model, read, station, at } = input;
  const speakers = await speakersOf(tx, pair.id);
  if (!speakers.L || !speakers.R) throw new AppError(409, `${pair.identity} does not hold two speakers: fit both before the test.`);
  const ids: number[] = [];
  for (const [side, points, file] of [["L", read.left, input.files.left], ["R", read.right, input.files.right]] as const) {
    const speaker = speakers[side]!;
    const eventId = await appendEvent(tx, { actorId: actor.id, station, type: "unit.response_measured", subjectKind: "item", subjectId: speaker.id, data: { identity: speaker.identity, purpose: "final", points: points.length, fileName: file.name, ...input.data } });
    const [row] = await tx.insert(responses).values({ itemId: speaker.id, purpose: "final", points: points.map((p) => (p.phaseDeg === undefined ? [p.hz, p.db] : [p.hz, p.db, p.phaseDeg])), fileName: file.name, source: "upload", eventId, createdAt: at }).returning({ id: responses.id });
    ids.push(row!.id);
  }
  const { comparison } = read;
  const limitDb = model.pairResponseLimitDb;
  const figures = { pass: comparison.pass, maxDiffDb: comparison.maxAbsDiffDb, worstBand: comparison.worstBand, limitDb, minHz: model.responseMinHz, maxHz: model.responseMaxHz };
  const eventId = await appendEvent(tx, { actorId: actor.id, station, type: "pair.final_tested", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, ...figures, ...input.data } });
  const [test] = await tx
    .insert(finalTests)
    .values({ pairId: pair.id, leftResponseId: ids[0]!, rightResponseId: ids[1]!, limitDb, maxDiffDb: comparison.maxAbsDiffDb, worstBand: comparison.worstBand, pass: comparison.pass, eventId, createdAt: at })
    .returning({ id: finalTests.id });
  return { finalTestId: test!.id, figures };
}

export interface FinalTestResult {
  comparison: ResponseComparison;
  limitDb: number;
  nc: string | null;
}

/**
 * The final pair test: the finished left and right responses compared per one-third-octave band,
 * |L − R| over the model's range against its limit. A pass makes the pair ready to pack; a fail
 * opens a nonconformance on the pair for quality. Both files are checked before anything is written.
 */
export async function recordFinalTest(db: DbOrTx, input: { pair: string; left: { name: string; text: string }; right: { name: string; text: string } }, actor: { id: string }): Promise<FinalTestResult> {
  const parsedSerial = parseSerial(input.pair);
  const pair = await itemByIdentity(db, parsedSerial?.valid ? parsedSerial.canonical : input.pair.trim().toUpperCase());
  if (!pair || pair.kind !== "pair") throw new AppError(404, `${input.pair} is not a pair in the register.`);
  if (pair.state !== AWAITING_TEST) throw new AppError(409, `${pair.identity} is ${pair.state.replace(/_/g, " ")}: only a built pair waiting for its test is tested here.`);
  // The range and limit of the model version the pair was started under, not a later edit's.
  const model = await modelSpecOf(db, pair);
  if (!model) throw new AppError(409, `${pair.identity} has no model to test against.`);
  const files = { left: input.left, right: input.right };
  const read = readPairTest(model, files);
  const { comparison } = read;
  const limitDb = model.pairResponseLimitDb;
  return db.transaction(async (tx) => {
    const at = clockNow();
    await recordPairTest(tx, { pair, model, files, read, station: "lab", at }, actor);
    let nc: string | null = null;
    if (comparison.pass) {
      await changeState(tx, pair, READY_TO_PACK, { actorId: actor.id, station: "lab" });
    } else {
      nc = await nextNcCode(tx, at);
      const finding = `Final test: left and right differ by ${formatDb(comparison.maxAbsDiffDb)} at ${bandLabel(comparison.worstBand)} (limit ${formatLimitDb(limitDb)})`;
      const opened = await appendEvent(tx, { actorId: actor.id, station: "lab", type: "nc.opened", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, code: nc, step: "Final pair test", seq: 0, finding } });
      await tx.insert(nonconformances).values({ id: newId(), code: nc, pairId: pair.id, cabinets: [], seq: 0, finding, openedAt: at, openedEventId: opened });
      await changeState(tx, pair, "failed_test", { actorId: actor.id, station: "lab" }, { nc });
    }
    return { comparison, limitDb, nc };
  });
}

/** Pairs built and waiting for the final test, oldest first. */
export async function pairsAwaitingTest(db: DbOrTx) {
  return db
    .select({ identity: items.identity, model: models.code, name: models.name, createdAt: items.createdAt })
    .from(items)
    .innerJoin(models, eq(models.id, items.modelId))
    .where(and(eq(items.kind, "pair"), eq(items.state, AWAITING_TEST)))
    .orderBy(items.createdAt);
}

/** The newest final test of a pair, with both responses. */
export async function latestFinalTest(db: DbOrTx, pairId: string) {
  const [test] = await db.select().from(finalTests).where(eq(finalTests.pairId, pairId)).orderBy(desc(finalTests.id)).limit(1);
  if (!test) return null;
  const rs = await db.select().from(responses).where(inArray(responses.id, [test.leftResponseId, test.rightResponseId]));
  return { test, left: rs.find((r) => r.id === test.leftResponseId)!, right: rs.find((r) => r.id === test.rightResponseId)! };
}
