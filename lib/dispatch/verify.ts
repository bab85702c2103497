import "server-only";
import { and, desc, eq, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { certificateRevisions, certificates, finishes, items, links, models } from "@/db/schema";
import { CERTIFICATE_CODE_PATTERN } from "@/lib/certificates/code";
import { monthName } from "./dates";

/**
 * What the public check shows of a certificate, and nothing more: no names, dealer, owner, ids,
 * case codes, states or test figures; after a repair, which revision this code is, the current
 * one, and the owner's line about each repair. The keys are listed once here so a test can hold the answer to them.
 */
export const PUBLIC_CERTIFICATE_FIELDS = ["model", "finish", "leftSerial", "rightSerial", "pairSerial", "buildMonth", "issuedOn", "revision", "current", "repairs"] as const;

export interface VerifiedCertificate {
  /** "PW2 Parlour Two" */
  model: string;
  finish: string | null;
  leftSerial: string | null;
  rightSerial: string | null;
  pairSerial: string;
  /** "November 2026": the month the two speakers were put together as the pair. */
  buildMonth: string | null;
  /** When the original certificate was issued. */
  issuedOn: Date;
  /** The revision this code belongs to: 1 for the original, 2, 3… after repairs. */
  revision: { number: number; issuedOn: Date };
  /** The newest revision; the same number as `revision` when this code is the current one. */
  current: { number: number; issuedOn: Date };
  /** The owner's line of each repair, newest first: "Right speaker's tweeter replaced on …". */
  repairs: string[];
}

/** Certificate codes as the link carries them; a code typed in capitals is read the same. */
export function normaliseCode(code: string): string | null {
  const c = code.trim().toLowerCase();
  return CERTIFICATE_CODE_PATTERN.test(c) ? c : null;
}

/** The public facts of the certificate with this code, or null for an unknown or malformed code. */
export async function verifyCertificate(db: DbOrTx, code: string): Promise<VerifiedCertificate | null> {
  const c = normaliseCode(code);
  if (!c) return null;
  // The code is the original's or one revision's: both verify, whichever the owner holds.
  const [byRevision] = await db
    .select({ certificateId: certificateRevisions.certificateId, number: certificateRevisions.revision })
    .from(certificateRevisions)
    .where(eq(certificateRevisions.code, c))
    .limit(1);
  const [row] = await db
    .select({ id: certificates.id, pairId: items.id, pairSerial: items.identity, issuedAt: certificates.issuedAt, modelCode: models.code, modelName: models.name, finish: finishes.name })
    .from(certificates)
    .innerJoin(items, eq(items.id, certificates.pairId))
    .leftJoin(models, eq(models.id, items.modelId))
    .leftJoin(finishes, eq(finishes.id, items.finishId))
    .where(byRevision ? eq(certificates.id, byRevision.certificateId) : eq(certificates.code, c))
    .limit(1);
  if (!row) return null;
  const revisions = await db
    .select({ number: certificateRevisions.revision, issuedAt: certificateRevisions.issuedAt, repairLine: certificateRevisions.repairLine })
    .from(certificateRevisions)
    .where(eq(certificateRevisions.certificateId, row.id))
    .orderBy(desc(certificateRevisions.revision));
  const all = [...revisions, { number: 1, issuedAt: row.issuedAt, repairLine: null }];
  const mine = all.find((r) => r.number === (byRevision?.number ?? 1))!;
  const newest = all[0]!;
  const speakers = await db
    .select({ identity: items.identity, position: links.position, startedAt: links.startedAt })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, row.pairId), isNull(links.endedAt), eq(items.kind, "speaker")));
  const left = speakers.find((s) => s.position === "L");
  const right = speakers.find((s) => s.position === "R");
  // Built when the second speaker joined the pair, as the certificate itself prints it.
  const builtAt = left && right ? new Date(Math.max(left.startedAt.getTime(), right.startedAt.getTime())) : null;
  return {
    model: [row.modelCode, row.modelName].filter(Boolean).join(" "),
    finish: row.finish ?? null,
    leftSerial: left?.identity ?? null,
    rightSerial: right?.identity ?? null,
    pairSerial: row.pairSerial,
    buildMonth: builtAt ? monthName(builtAt) : null,
    issuedOn: row.issuedAt,
    revision: { number: mine.number, issuedOn: mine.issuedAt },
    current: { number: newest.number, issuedOn: newest.issuedAt },
    repairs: revisions.map((r) => r.repairLine),
  };
}

/**
 * The pair a certificate code (the original's or a revision's) belongs to, for an owner's
 * registration from the public check: never shown on the page. Null for an unknown code.
 */
export async function pairOfCertificate(db: DbOrTx, code: string): Promise<{ id: string; identity: string; shipped: boolean } | null> {
  const c = normaliseCode(code);
  if (!c) return null;
  const [byRevision] = await db.select({ certificateId: certificateRevisions.certificateId }).from(certificateRevisions).where(eq(certificateRevisions.code, c)).limit(1);
  const [row] = await db
    .select({ id: items.id, identity: items.identity, state: items.state })
    .from(certificates)
    .innerJoin(items, eq(items.id, certificates.pairId))
    .where(byRevision ? eq(certificates.id, byRevision.certificateId) : eq(certificates.code, c))
    .limit(1);
  return row ? { id: row.id, identity: row.identity, shipped: row.state === "shipped" } : null;
}
