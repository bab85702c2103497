import "server-only";
import { desc, eq, inArray } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import { certificateRevisions, finalTests, items, responses, serviceCases, type CertificateRevision } from "@/db/schema";
import type { ResponseComparison } from "@/lib/acoustics";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { issueRevision } from "@/lib/certificates/revisions";
import { readPairTest, recordPairTest } from "@/lib/lab/final-test";
import { appendEvent } from "@/lib/events/queries";
import { CASE_STATE_WORDS } from "@/lib/vocabulary/case-states";
import { caseByCode } from "./queries";
import { moveCase, SERVICE_STATION } from "./states";
import { modelSpecOf } from "@/lib/workshop/model-spec-of";

export interface RetestResult {
  comparison: ResponseComparison;
  limitDb: number;
  finalTestId: number;
  /** The certificate revision a pass issued; null after a fail. */
  revision: Pick<CertificateRevision, "id" | "revision" | "repairLine" | "issuedAt"> | null;
}

export { caseByCode };

/** What the re-test page shows: the case, its pair and model, and the pair's newest final test. */
export async function retestView(db: DbOrTx, code: string) {
  const found = await caseByCode(db, code);
  if (!found) return null;
  const [pair] = await db.select().from(items).where(eq(items.id, found.pairId)).limit(1);
  const model = pair ? await modelSpecOf(db, pair) : null;
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
  // Tested again under the model version the pair was built under.
  const model = pair ? await modelSpecOf(db, pair) : null;
  if (!pair || !model) throw new AppError(409, `Case ${found.code} has no pair with a model to test against.`);
  const files = { left: input.left, right: input.right };
  const read = readPairTest(model, files);
  const { comparison } = read;
  const limitDb = model.pairResponseLimitDb;
  return db.transaction(async (tx) => {
    // The case may have moved since it was read (another desk, a second click): check again in the write lock.
    const [now] = await tx.select().from(serviceCases).where(eq(serviceCases.id, found.id)).limit(1);
    if (now!.state !== "repaired") throw new AppError(409, `Case ${found.code} is now “${CASE_STATE_WORDS[now!.state]}”: it was re-tested or moved meanwhile. Nothing was saved.`);
    const at = clockNow();
    const { finalTestId, figures } = await recordPairTest(tx, { pair, model, files, read, station: SERVICE_STATION, data: { code: found.code }, at }, actor);
    await appendEvent(tx, { actorId: actor.id, station: SERVICE_STATION, type: "case.retested", subjectKind: "case", subjectId: found.id, data: { code: found.code, identity: pair.identity, finalTestId: finalTestId, ...figures } });
    if (!comparison.pass) return { comparison, limitDb, finalTestId: finalTestId, revision: null };
    await moveCase(tx, { caseId: found.id, from: "repaired", to: "tested", data: { finalTestId: finalTestId } }, actor);
    const revision = await issueRevision(tx, { pairId: pair.id, pairIdentity: pair.identity, caseId: found.id, caseCode: found.code, caseOpenedAt: found.openedAt, finalTestId: finalTestId }, actor.id);
    return { comparison, limitDb, finalTestId: finalTestId, revision: { id: revision.id, revision: revision.revision, repairLine: revision.repairLine, issuedAt: revision.issuedAt } };
  });
}
