import "server-only";
import { and, asc, desc, eq, gt, inArray, isNotNull, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { certificateRevisionPrints, certificateRevisions, certificates, items, links, type CertificateRevision, type RevisionReplacement } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import type { Station } from "@/lib/vocabulary/stations";
import { certificateCode } from "./code";
import { issueCertificateIn } from "./data";
import { originalOrCopy, type RecordedPrint } from "./prints";
import { repairLine } from "./repair-line";

/** Every revision of a certificate, oldest first (the original, revision 1, is the certificate itself). */
export async function revisionsOf(db: DbOrTx, certificateId: string): Promise<CertificateRevision[]> {
  return db.select().from(certificateRevisions).where(eq(certificateRevisions.certificateId, certificateId)).orderBy(asc(certificateRevisions.revision));
}

/** The newest revision of a certificate, or null while the original is current. */
export async function currentRevision(db: DbOrTx, certificateId: string): Promise<CertificateRevision | null> {
  const [row] = await db.select().from(certificateRevisions).where(eq(certificateRevisions.certificateId, certificateId)).orderBy(desc(certificateRevisions.revision)).limit(1);
  return row ?? null;
}

/** The revisions a service case issued, oldest first. */
export async function revisionsOfCase(db: DbOrTx, caseId: string): Promise<CertificateRevision[]> {
  return db.select().from(certificateRevisions).where(eq(certificateRevisions.caseId, caseId)).orderBy(asc(certificateRevisions.revision));
}

/**
 * The drive units and crossovers fitted into the pair's speakers after `since` (a repair), each
 * with the serial that sat at that position before it, read from the links the repair wrote.
 */
export async function replacementsSince(db: DbOrTx, pairId: string, since: Date): Promise<RevisionReplacement[]> {
  const speakers = await db
    .select({ id: links.childId, side: links.position })
    .from(links)
    .where(and(eq(links.parentId, pairId), isNull(links.endedAt), inArray(links.position, ["L", "R"])));
  if (speakers.length === 0) return [];
  const sideOf = new Map(speakers.map((s) => [s.id, s.side as "L" | "R"]));
  const fitted = await db
    .select({ parentId: links.parentId, position: links.position, startedAt: links.startedAt, kind: items.kind, partType: items.partType, identity: items.identity })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(inArray(links.parentId, [...sideOf.keys()]), isNull(links.endedAt), gt(links.startedAt, since), inArray(items.kind, ["drive_unit", "crossover"])));
  if (fitted.length === 0) return [];
  const ended = await db
    .select({ parentId: links.parentId, position: links.position, endedAt: links.endedAt, identity: items.identity })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(inArray(links.parentId, [...sideOf.keys()]), isNotNull(links.endedAt)));
  return fitted
    .map((f) => {
      // What sat there before: the link at the same speaker and position that ended last before this one began.
      const before = ended
        .filter((e) => e.parentId === f.parentId && e.position === f.position && e.endedAt!.getTime() <= f.startedAt.getTime())
        .sort((a, b) => b.endedAt!.getTime() - a.endedAt!.getTime())[0];
      return {
        side: sideOf.get(f.parentId)!,
        position: f.position,
        part: f.kind === "crossover" ? "crossover" : (f.partType ?? "drive unit"),
        removed: before?.identity ?? null,
        fitted: f.identity,
        at: f.startedAt.getTime(),
      };
    })
    .sort((a, b) => a.at - b.at || a.side.localeCompare(b.side) || a.position.localeCompare(b.position));
}

/**
 * Issues the next revision of the pair's certificate after a passing re-test, in the caller's
 * write transaction: revision 2, 3… (unique per certificate), its own code, the case, what the
 * repair replaced since the case was opened and the owner's line. The original certificate is
 * issued first if the pair never had one. Appends "certificate.revised".
 */
export async function issueRevision(
  tx: DbOrTx,
  input: { pairId: string; pairIdentity: string; caseId: string; caseCode: string; caseOpenedAt: Date; finalTestId: number },
  actorId: string | null,
): Promise<CertificateRevision> {
  const certificate = await issueCertificateIn(tx, input.pairId, actorId);
  const latest = await currentRevision(tx, certificate.id);
  const number = (latest?.revision ?? 1) + 1;
  const replaced = await replacementsSince(tx, input.pairId, input.caseOpenedAt);
  const at = now();
  const repairedAt = replaced.length ? new Date(Math.max(...replaced.map((r) => r.at))) : at;
  const id = newId();
  const eventId = await appendEvent(tx, {
    actorId,
    station: "service",
    type: "certificate.revised",
    subjectKind: "item",
    subjectId: input.pairId,
    // The revision's code stays out of the log, like the certificate's. The number is written as
    // text because the event's sentence (lib/events/describe.ts) reads it as text.
    data: { identity: input.pairIdentity, certificateId: certificate.id, revisionId: id, revision: String(number), code: input.caseCode, finalTestId: input.finalTestId, replaced: replaced.length },
  });
  try {
    const [row] = await tx
      .insert(certificateRevisions)
      .values({
        id,
        certificateId: certificate.id,
        revision: number,
        code: certificateCode(),
        caseId: input.caseId,
        finalTestId: input.finalTestId,
        repairLine: repairLine(replaced, repairedAt),
        replaced,
        repairedAt,
        issuedAt: at,
        eventId,
      })
      .returning();
    return row!;
  } catch (e) {
    if (isConstraintError(e, "UNIQUE")) throw new AppError(409, "Another revision of this certificate was issued at the same moment. Nothing was saved: look at the case again.");
    throw e;
  }
}

/**
 * Records one print of a revision: the original of that revision when none was printed and no
 * copy was asked for, else a copy (one original per revision, held by a partial unique index).
 */
export async function recordRevisionPrint(
  db: DbOrTx,
  revisionId: string,
  opts: { actorId: string | null; copy: boolean; station: Station },
): Promise<RecordedPrint> {
  const attempt = (wantOriginal: boolean) =>
    db.transaction(async (tx) => {
      const [row] = await tx
        .select({ id: certificateRevisions.id, revision: certificateRevisions.revision, certificateId: certificateRevisions.certificateId, pairId: items.id, identity: items.identity })
        .from(certificateRevisions)
        .innerJoin(certificates, eq(certificates.id, certificateRevisions.certificateId))
        .innerJoin(items, eq(items.id, certificates.pairId))
        .where(eq(certificateRevisions.id, revisionId))
        .limit(1);
      if (!row) throw new AppError(404, "No such certificate revision.");
      const [done] = await tx
        .select({ id: certificateRevisionPrints.id })
        .from(certificateRevisionPrints)
        .where(and(eq(certificateRevisionPrints.revisionId, revisionId), eq(certificateRevisionPrints.original, true)))
        .limit(1);
      const original = wantOriginal && !done;
      const eventId = await appendEvent(tx, {
        actorId: opts.actorId,
        station: opts.station,
        type: "certificate.printed",
        subjectKind: "item",
        subjectId: row.pairId,
        data: { identity: row.identity, certificateId: row.certificateId, revisionId: row.id, revision: row.revision, copy: !original },
      });
      const id = newId();
      await tx.insert(certificateRevisionPrints).values({ id, revisionId, original, actorId: opts.actorId, eventId, printedAt: now() });
      return { id, original, eventId };
    });
  return originalOrCopy(opts.copy, attempt);
}
