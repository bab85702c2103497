import "server-only";
/**
 * Each carton's SSCC: allocated inside the transaction that makes the carton (the next serial
 * reference of the workshop's extension and prefix), stored once in carton_ssccs.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import type { DbOrTx, Tx } from "@/db";
import { cartonSsccs, type Item } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { now as clockNow } from "@/lib/clock";
import { checkGs1Settings, formatSscc, maxSerialReference, type Gs1Settings } from "@/lib/gs1";

/**
 * The GS1 settings packing needs, or a 409 saying what is wrong: a carton is never made with an
 * SSCC the supply chain could not read.
 */
export function packingGs1Settings(): Gs1Settings {
  const r = checkGs1Settings();
  if (!r.ok) throw new AppError(409, `Cartons cannot be packed until the GS1 settings are put right: ${r.problems.join(" ")} Ask whoever runs the server.`);
  return r.settings;
}

/** Allocates the carton's SSCC (the next serial reference) and stores it; returns the 18 digits. */
export async function assignSscc(tx: Tx, carton: Pick<Item, "id" | "identity">, settings: Gs1Settings = packingGs1Settings()): Promise<string> {
  const [row] = await tx
    .select({ last: sql<number | null>`max(${cartonSsccs.serialReference})` })
    .from(cartonSsccs)
    .where(and(eq(cartonSsccs.extension, settings.extension), eq(cartonSsccs.companyPrefix, settings.companyPrefix)));
  const serialReference = Number(row?.last ?? 0) + 1;
  if (serialReference > maxSerialReference(settings.companyPrefix)) {
    throw new AppError(409, `Every SSCC of extension ${settings.extension} and company prefix ${settings.companyPrefix} has been used: set another extension digit before packing more cartons.`);
  }
  const sscc = formatSscc({ ...settings, serialReference });
  await tx.insert(cartonSsccs).values({ cartonId: carton.id, sscc, extension: settings.extension, companyPrefix: settings.companyPrefix, serialReference, assignedAt: clockNow() });
  return sscc;
}

export interface CartonSsccFacts {
  sscc: string;
  prefixLength: number;
}

/** The SSCC of each carton that has one, by carton id. */
export async function ssccsOf(db: DbOrTx, cartonIds: readonly string[]): Promise<Map<string, CartonSsccFacts>> {
  if (cartonIds.length === 0) return new Map();
  const rows = await db
    .select({ cartonId: cartonSsccs.cartonId, sscc: cartonSsccs.sscc, prefix: cartonSsccs.companyPrefix })
    .from(cartonSsccs)
    .where(inArray(cartonSsccs.cartonId, [...new Set(cartonIds)]));
  return new Map(rows.map((r) => [r.cartonId, { sscc: r.sscc, prefixLength: r.prefix.length }]));
}
