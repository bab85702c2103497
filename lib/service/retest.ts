import "server-only";
import { and, desc, eq, inArray, isNull } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { certificateRevisions, finalTests, items, links, models, responses, serviceCases, type CertificateRevision, type ServiceCase } from "@/db/schema";
import { compareResponses, parseResponseFile, type ResponseComparison } from "@/lib/acoustics";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { issueRevision } from "@/lib/certificates/revisions";
import { appendEvent } from "@/lib/events/queries";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { moveCase, SERVICE_STATION } from "./states";

export interface RetestResult {
  comparison: ResponseComparison;
  limitDb: number;
  finalTestId: number;
  /** The certificate revision a pass issued; null after a fail. */
  revision: Pick<CertificateRevision, "id" | "revision" | "repairLine" | "issuedAt"> | null;
}

/** A service case by its code (as typed: trimmed, any case), or null. */
export async function caseByCode(db: DbOrTx, code: string): Promise<ServiceCase | null> {
  const [row] = await db.select().from(serviceCases).where(eq(serviceCases.code, code.trim().toUpperCase())).limit(1);
  return row ?? null;
}

/** What the re-test page shows: the case, its pair and model, and the pair's newest final test. */
export async function retestView(db: DbOrTx, code: string) {
  const found = await caseByCode(db, code);
  if (!found) return null;
  const [pair] = await db.select().from(items).where(eq(items.id, found.pairId)).limit(1);
  const [model] = pair?.modelId ? await db.select().from(models).where(eq(models.id, pair.modelId)).limit(1) : [];
  const [test] = await db.select().from(finalTests).where(eq(finalTests.pairId, found.pairId)).orderBy(desc(finalTests.id)).limit(1);
  const rs = test ? await db.select().from(responses).where(inArray(responses.id, [test.leftResponseId, test.rightResponseId])) : [];
  // Only a test made for this case counts as its re-test (an older one is the lab's, from the build).
  const mine = test && test.createdAt.getTime() >= found.openedAt.getTime() ? test : null;
  const [revision] = await db
    .select({ revision: certificateRevisions.revision, repairLine: certificateRevisions.repairLine, issuedAt: certificateRevisions.issuedAt })
    .from(certificateRevisions)
    .where(eq(certificateRevisions.caseId, found.id))
    .orderBy(desc(certificateRevisions.revision))
    .limit(1);
  return {
    /** The certificate revision this case's passing re-test issued, if any. */
    revision: revision ?? null,
    case: found,
    pair: pair ?? null,
    model: model ?? null,
    test: mine ? { ...mine, left: rs.find((r) => r.id === mine.leftResponseId)!, right: rs.find((r) => r.id === mine.rightResponseId)! } : null,
  };
}

async function speakersOf(db: DbOrTx, pairId: string) {
  const rows = await db
    .select({ item: items, position: links.position })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, pairId), isNull(links.endedAt), inArray(links.position, ["L", "R"]), eq(items.kind, "speaker")));
  return { L: rows.find((r) => r.position === "L")?.item ?? null, R: rows.find((r) => r.position === "R")?.item ?? null };
}

/**
 * The repaired pair's final test again, under the lab's acceptance rule (lib/acoustics
 * `compareResponses` over the model's range against its limit, as lib/lab/final-test.ts
 * `recordFinalTest` applies it; a band exactly at the limit passes). Recorded like any final test
 * (both responses, "pair.final_tested", a `final_tests` row) with the case named, plus
 * "case.retested". A pass moves the case to "tested" and issues the next certificate revision in
 * the same transaction; a fail leaves it "repaired" (back to diagnosis is the desk's own move).
 * Both files are checked before anything is written.
 */
export async function retestCase(db: Db, input: { code: string; left: { name: string; text: string }; right: { name: string; text: string } }, actor: { id: string }): Promise<RetestResult> {
  const found = await caseByCode(db, input.code);
  if (!found) throw new AppError(404, `There is no service case ${input.code.trim().toUpperCase()}.`);
  if (found.state !== "repaired") throw new AppError(409, `Case ${found.code} is “${CASE_STATE_WORDS[found.state]}”: only a repaired pair is tested again here.`);
  const [pair] = await db.select().from(items).where(eq(items.id, found.pairId)).limit(1);
  const [model] = pair?.modelId ? await db.select().from(models).where(eq(models.id, pair.modelId)).limit(1) : [];
  if (!pair || !model) throw new AppError(409, `Case ${found.code} has no pair with a model to test against.`);
  const problems: string[] = [];
  const parse = (side: string, f: { name: string; text: string }) => {
    const r = parseResponseFile(f.text, { name: f.name });
    if (!r.ok) for (const e of r.errors.slice(0, 8)) problems.push(`${side} (${f.name}), line ${e.line}: ${e.message}`);
    return r.ok ? r.points : null;
  };
  const left = parse("Left", input.left);
  const right = parse("Right", input.right);
  if (problems.length || !left || !right) throw new AppError(400, "Nothing was saved: the response files need attention.", { files: problems });
  let comparison: ResponseComparison;
  try {
    comparison = compareResponses(left, right, { minHz: model.responseMinHz, maxHz: model.responseMaxHz, limitDb: model.pairResponseLimitDb });
  } catch (e) {
    throw new AppError(400, `Nothing was saved: ${(e as Error).message}`);
  }
  const limitDb = model.pairResponseLimitDb;
  return db.transaction(async (tx) => {
    // The case may have moved since it was read (another desk, a second click): check again in the write lock.
    const [now] = await tx.select().from(serviceCases).where(eq(serviceCases.id, found.id)).limit(1);
    if (now!.state !== "repaired") throw new AppError(409, `Case ${found.code} is now “${CASE_STATE_WORDS[now!.state]}”: it was re-tested or moved meanwhile. Nothing was saved.`);
    const at = clockNow();
    const speakers = await speakersOf(tx, pair.id);
    if (!speakers.L || !speakers.R) throw new AppError(409, `${pair.identity} does not hold two speakers: fit both before the test.`);
    const ids: number[] = [];
    for (const [side, points, file] of [["L", left, input.left], ["R", right, input.right]] as const) {
      const speaker = speakers[side]!;
      const eventId = await appendEvent(tx, { actorId: actor.id, station: SERVICE_STATION, type: "unit.response_measured", subjectKind: "item", subjectId: speaker.id, data: { identity: speaker.identity, purpose: "final", points: points.length, fileName: file.name, code: found.code } });
      const [row] = await tx.insert(responses).values({ itemId: speaker.id, purpose: "final", points: points.map((p) => (p.phaseDeg === undefined ? [p.hz, p.db] : [p.hz, p.db, p.phaseDeg])), fileName: file.name, source: "upload", eventId, createdAt: at }).returning({ id: responses.id });
      ids.push(row!.id);
    }
    const figures = { pass: comparison.pass, maxDiffDb: comparison.maxAbsDiffDb, worstBand: comparison.worstBand, limitDb, minHz: model.responseMinHz, maxHz: model.responseMaxHz };
    const eventId = await appendEvent(tx, { actorId: actor.id, station: SERVICE_STATION, type: "pair.final_tested", subjectKind: "item", subjectId: pair.id, data: { identity: pair.identity, ...figures, code: found.code } });
    const [test] = await tx
      .insert(finalTests)
      .values({ pairId: pair.id, leftResponseId: ids[0]!, rightResponseId: ids[1]!, limitDb, maxDiffDb: comparison.maxAbsDiffDb, worstBand: comparison.worstBand, pass: comparison.pass, eventId, createdAt: at })
      .returning({ id: finalTests.id });
    await appendEvent(tx, { actorId: actor.id, station: SERVICE_STATION, type: "case.retested", subjectKind: "case", subjectId: found.id, data: { code: found.code, identity: pair.identity, finalTestId: test!.id, ...figures } });
    if (!comparison.pass) return { comparison, limitDb, finalTestId: test!.id, revision: null };
    await moveCase(tx, { caseId: found.id, from: "repaired", to: "tested", data: { finalTestId: test!.id } }, actor);
    const revision = await issueRevision(tx, { pairId: pair.id, pairIdentity: pair.identity, caseId: found.id, caseCode: found.code, caseOpenedAt: found.openedAt, finalTestId: test!.id }, actor.id);
    return { comparison, limitDb, finalTestId: test!.id, revision: { id: revision.id, revision: revision.revision, repairLine: revision.repairLine, issuedAt: revision.issuedAt } };
  });
}
