import "server-only";
import { and, eq, isNull } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { certificates, finishes, items, links, models } from "@/db/schema";
import { CERTIFICATE_CODE_PATTERN } from "@/lib/certificates/code";
import { monthName } from "./dates";

/**
 * What the public check shows of a certificate, and nothing more: no names, dealer, owner, ids,
 * states or test figures. The keys are listed once here so a test can hold the answer to them.
 */
export const PUBLIC_CERTIFICATE_FIELDS = ["model", "finish", "leftSerial", "rightSerial", "pairSerial", "buildMonth", "issuedOn"] as const;

export interface VerifiedCertificate {
  /** "PW2 Parlour Two" */
  model: string;
  finish: string | null;
  leftSerial: string | null;
  rightSerial: string | null;
  pairSerial: string;
  /** "November 2026": the month the two speakers were put together as the pair. */
  buildMonth: string | null;
  issuedOn: Date;
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
  const [row] = await db
    .select({ pairId: items.id, pairSerial: items.identity, issuedAt: certificates.issuedAt, modelCode: models.code, modelName: models.name, finish: finishes.name })
    .from(certificates)
    .innerJoin(items, eq(items.id, certificates.pairId))
    .leftJoin(models, eq(models.id, items.modelId))
    .leftJoin(finishes, eq(finishes.id, items.finishId))
    .where(eq(certificates.code, c))
    .limit(1);
  if (!row) return null;
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
  };
}
