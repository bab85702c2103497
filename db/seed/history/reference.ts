/** What the history is written against: the seeded models, finishes, dealers and the demo users who do the work. */
import { eq } from "drizzle-orm";
import type { Db } from "@/db";
import { dealers, finishes, modelPositions, modelTolerances, models, modelTrimPositions, users } from "@/db/schema";
import type { PartType } from "@/lib/vocabulary/part-types";

export type Role = "veneer" | "cabinet" | "lab" | "assembly" | "packing" | "service" | "quality";
export const ROLES_AT_WORK: readonly Role[] = ["veneer", "cabinet", "lab", "assembly", "packing", "service", "quality"];

export interface RefModel {
  id: string;
  code: string;
  leavesPerFace: number;
  minLeafLengthMm: number;
  minLeafWidthMm: number;
  pairResponseLimitDb: number;
  /** The model's warranty period (the service desk's demo cases pick pairs in and out of it). */
  warrantyMonths: number;
  responseMinHz: number;
  responseMaxHz: number;
  /** One row per unit a speaker takes, by position code ("T", "B1"…), tweeter first. */
  positions: { position: string; partType: PartType }[];
  /** Drive-unit mismatch limit per part type, dB. */
  limits: Partial<Record<PartType, number>>;
  /** One row per trim part a speaker takes, by slot code ("TOP", or "PLN-1"… for a count of n), with the model's trim position. */
  trim: { slot: string; position: string }[];
}

export interface RefFinish {
  id: string;
  code: string;
  name: string;
  kind: "veneer" | "lacquer";
}

export interface Reference {
  models: RefModel[];
  finishes: RefFinish[];
  dealers: { id: string; code: string; country: string }[];
  actors: Record<Role, { id: string }>;
}

const PART_RANK: Record<PartType, number> = { tweeter: 0, midrange: 1, bass: 2 };

/** The reference the history needs, or null when some is missing (then no history is written). */
export async function loadReference(db: Db): Promise<Reference | null> {
  const modelRows = await db.select().from(models).where(eq(models.active, true)).orderBy(models.code);
  const positionRows = await db.select().from(modelPositions).orderBy(modelPositions.position);
  const toleranceRows = await db.select().from(modelTolerances);
  const trimRows = await db.select().from(modelTrimPositions).orderBy(modelTrimPositions.position);
  const finishRows = await db.select().from(finishes).where(eq(finishes.active, true)).orderBy(finishes.code);
  const dealerRows = await db.select().from(dealers).where(eq(dealers.active, true)).orderBy(dealers.code);
  const userRows = await db.select({ id: users.id, email: users.email }).from(users).where(eq(users.demo, true));
  if (modelRows.length === 0 || dealerRows.length === 0 || !finishRows.some((f) => f.kind === "veneer")) return null;

  const actors = {} as Record<Role, { id: string }>;
  for (const role of ROLES_AT_WORK) {
    const u = userRows.find((r) => r.email === `${role}@demo.twinleaf.test`);
    if (!u) return null;
    actors[role] = { id: u.id };
  }
  return {
    models: modelRows.map((m) => ({
      id: m.id,
      code: m.code,
      warrantyMonths: m.warrantyMonths,
      leavesPerFace: m.leavesPerFace,
      minLeafLengthMm: m.minLeafLengthMm,
      minLeafWidthMm: m.minLeafWidthMm,
      pairResponseLimitDb: m.pairResponseLimitDb,
      responseMinHz: m.responseMinHz,
      responseMaxHz: m.responseMaxHz,
      // A position with count n would hold n units (no demo model has one): P-1…P-n, as lib/assembly/slots.ts names them.
      positions: positionRows
        .filter((p) => p.modelId === m.id)
        .flatMap((p) => (p.count === 1 ? [{ position: p.position, partType: p.partType }] : Array.from({ length: p.count }, (_, i) => ({ position: `${p.position}-${i + 1}`, partType: p.partType }))))
        .sort((a, b) => PART_RANK[a.partType] - PART_RANK[b.partType] || a.position.localeCompare(b.position, undefined, { numeric: true })),
      limits: Object.fromEntries(toleranceRows.filter((t) => t.modelId === m.id).map((t) => [t.partType, t.mismatchLimitDb])),
      // As lib/assembly/slots.ts names the slots: the code, or CODE-1…CODE-n for a count of n.
      trim: trimRows
        .filter((t) => t.modelId === m.id)
        .flatMap((t) => (t.count <= 1 ? [{ slot: t.position, position: t.position }] : Array.from({ length: t.count }, (_, i) => ({ slot: `${t.position}-${i + 1}`, position: t.position })))),
    })),
    finishes: finishRows.map((f) => ({ id: f.id, code: f.code, name: f.name, kind: f.kind })),
    dealers: dealerRows.map((d) => ({ id: d.id, code: d.code, country: d.country })),
    actors,
  };
}
