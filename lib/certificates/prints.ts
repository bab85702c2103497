import "server-only";
import { and, eq, gte } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { certificatePrints, certificateRevisionPrints, certificateRevisions, certificates, items } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { newId } from "@/lib/auth/tokens";
import { now } from "@/lib/clock";
import { appendEvent } from "@/lib/events/queries";
import type { Station } from "@/lib/vocabulary/stations";

/**
 * How long the person who printed a certificate may open that print again (a reload, a second
 * tab); after that, and for anyone else, a new print must be asked for, which is recorded.
 */
export const PRINT_OPEN_FOR_MS = 10 * 60_000;

export interface RecordedPrint {
  id: string;
  /** True for the one original; every other print is a copy, marked COPY. */
  original: boolean;
  eventId: number;
}

/**
 * Records one print of a certificate: the original when none has been printed and no copy was
 * asked for, else a copy. The choice is made inside the write transaction, and the schema allows
 * one original per certificate (a partial unique index), so concurrent first prints from any
 * number of processes give exactly one original. Appends the "certificate.printed" event.
 */
export async function recordCertificatePrint(
  db: DbOrTx,
  certificateId: string,
  opts: { actorId: string | null; copy: boolean; station: Station },
): Promise<RecordedPrint> {
  const attempt = (wantOriginal: boolean) =>
    db.transaction(async (tx) => {
      const [row] = await tx
        .select({ id: certificates.id, pairId: certificates.pairId, identity: items.identity })
        .from(certificates)
        .innerJoin(items, eq(items.id, certificates.pairId))
        .where(eq(certificates.id, certificateId))
        .limit(1);
      if (!row) throw new AppError(404, "No such certificate.");
      const original = wantOriginal && !(await originalPrinted(tx, certificateId));
      const eventId = await appendEvent(tx, {
        actorId: opts.actorId,
        station: opts.station,
        type: "certificate.printed",
        subjectKind: "item",
        subjectId: row.pairId,
        data: { identity: row.identity, certificateId: row.id, copy: !original },
      });
      const id = newId();
      await tx.insert(certificatePrints).values({ id, certificateId, original, actorId: opts.actorId, eventId, printedAt: now() });
      return { id, original, eventId };
    });
  return originalOrCopy(opts.copy, attempt);
}

/**
 * Runs a print's transaction asking for the original unless a copy was asked for; when another
 * writer's original came first (the partial unique index says so), runs it again as a copy.
 */
export async function originalOrCopy<T>(copy: boolean | undefined, attempt: (wantOriginal: boolean) => Promise<T>): Promise<T> {
  try {
    return await attempt(!copy);
  } catch (e) {
    if (!copy && isConstraintError(e, "UNIQUE")) return attempt(false);
    throw e;
  }
}

/** True once the certificate's original has been printed: every later print is a copy. */
export async function originalPrinted(db: DbOrTx, certificateId: string): Promise<boolean> {
  const [row] = await db
    .select({ id: certificatePrints.id })
    .from(certificatePrints)
    .where(and(eq(certificatePrints.certificateId, certificateId), eq(certificatePrints.original, true)))
    .limit(1);
  return Boolean(row);
}

/**
 * A recorded print of the pair's certificate (the original certificate or one of its revisions)
 * that this person made within `PRINT_OPEN_FOR_MS`, to show again; null for anyone else's print,
 * an older one, or another pair's. `revisionId` names the revision printed (null: the original).
 */
export async function openablePrint(
  db: DbOrTx,
  input: { printId: string; pairId: string; actorId: string },
): Promise<{ id: string; original: boolean; pairId: string; revisionId: string | null } | null> {
  const since = new Date(now().getTime() - PRINT_OPEN_FOR_MS);
  const [row] = await db
    .select({ print: certificatePrints, pairId: certificates.pairId })
    .from(certificatePrints)
    .innerJoin(certificates, eq(certificates.id, certificatePrints.certificateId))
    .where(
      and(
        eq(certificatePrints.id, input.printId),
        eq(certificates.pairId, input.pairId),
        eq(certificatePrints.actorId, input.actorId),
        gte(certificatePrints.printedAt, since),
      ),
    )
    .limit(1);
  if (row) return { id: row.print.id, original: row.print.original, pairId: row.pairId, revisionId: null };
  const [rev] = await db
    .select({ id: certificateRevisionPrints.id, original: certificateRevisionPrints.original, revisionId: certificateRevisionPrints.revisionId, pairId: certificates.pairId })
    .from(certificateRevisionPrints)
    .innerJoin(certificateRevisions, eq(certificateRevisions.id, certificateRevisionPrints.revisionId))
    .innerJoin(certificates, eq(certificates.id, certificateRevisions.certificateId))
    .where(
      and(
        eq(certificateRevisionPrints.id, input.printId),
        eq(certificates.pairId, input.pairId),
        eq(certificateRevisionPrints.actorId, input.actorId),
        gte(certificateRevisionPrints.printedAt, since),
      ),
    )
    .limit(1);
  return rev ?? null;
}
