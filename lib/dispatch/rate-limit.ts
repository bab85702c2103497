import "server-only";
import type { Db } from "@/db";
import { reserve, type WindowPolicy } from "@/lib/limits";

/**
 * The limit on the public certificate check, kept in the database (lib/limits) so it holds across
 * server processes and restarts. proxy.ts enforces it for every /verify/… request, where it can
 * answer 429 with Retry-After; a page cannot set its status.
 */

/** 30 checks per address per 10 minutes: far more than an owner scanning a QR code needs. */
export const VERIFY_LIMIT: WindowPolicy = { windowMs: 10 * 60_000, max: 30 };

export type VerifyHit = { ok: true } | { ok: false; retryAfterSeconds: number };

/** Counts one certificate check from `address`; refused (and not counted) when over the limit. */
export async function hitVerifyLimit(db: Db, address: string, now: Date = new Date()): Promise<VerifyHit> {
  const r = await reserve(db, [{ key: `verify:address:${address}`, ...VERIFY_LIMIT }], { now, state: "counted" });
  return r.ok ? { ok: true } : { ok: false, retryAfterSeconds: Math.ceil(r.retryAfterMs / 1000) };
}
