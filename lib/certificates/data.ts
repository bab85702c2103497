import "server-only";
import { finishDetail } from "@/lib/workshop/finish-words";
import { SIDES, type Side } from "@/lib/vocabulary/sides";
import { and, asc, desc, eq, inArray, isNotNull, isNull } from "drizzle-orm";
import type { Db, DbOrTx } from "@/db";
import {
  certificatePrints,
  certificateRevisionPrints,
  certificateRevisions,
  certificates,
  events,
  finalTests,
  finishes,
  items,
  leafAllocations,
  links,
  matchedSets,
  modelPositions,
  models,
  modelTrimPositions,
  responses,
  setMembers,
  users,
  veneerLeaves,
  type Certificate,
} from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { appendEvent } from "@/lib/events/queries";
import { newId } from "@/lib/auth/tokens";
import { now as clockNow } from "@/lib/clock";
import { shippedAt } from "@/lib/genealogy/trace";
import { parseSerial } from "@/lib/serials/format";
import { SUPPLIER_LOT_POSITION } from "@/lib/vocabulary/positions";
import { certificateCode, verifyUrl } from "./code";
import { formatDb, formatHz } from "./figures";

export { formatDb, formatHz };


/** The pair states the demo history leaves a pair in after it shipped with a certificate. */
/** A pair past its final test: passed, or its deviation accepted by quality ("use as is"), then packed or shipped. */
const PAST_FINAL_TEST = new Set(["ready_to_pack", "packed", "shipped"]);

/** What one matched set says of the two parts at a position. */
export interface MatchFigure {
  setCode: string;
  /** Largest band difference between the two, dB. */
  maxDiffDb: number;
  limitDb: number;
}

/** One drive-unit position (or the crossover) with both serials. */
export interface PositionRow {
  /** Model position code: "T", "M", "B", "B1"…, or "XO" for the crossover. */
  position: string;
  /** tweeter | midrange | bass | crossover */
  part: string;
  left: string | null;
  right: string | null;
  /** Null where the two do not belong to one matched set (history pairs, a repair): printed "—". */
  match: MatchFigure | null;
}

/** One trim position of the model (a count of n gives n rows, "TOP-1"…) with both speakers' parts. */
export interface TrimRow {
  /** The link position in the speaker: "TOP", "PLN-2". */
  position: string;
  /** The model's name for it: "Top housing". */
  label: string;
  left: { identity: string; lot: string | null } | null;
  right: { identity: string; lot: string | null } | null;
}

export interface VeneerLeafOnFace {
  /** Face position, F1, F2… */
  position: string;
  /** The leaf's number in slicing order. */
  leafNo: number;
  identity: string;
  flitch: string;
  orientation: "as_cut" | "turned";
  /** The leaf replaced a damaged one at this position. */
  replacement: boolean;
}

export interface VeneerFace {
  cabinet: string;
  leaves: VeneerLeafOnFace[];
}

export interface VeneerOrigin {
  /** The finish name, e.g. "Black walnut". */
  species: string;
  /** Botanical name and cut, e.g. "Juglans nigra, crown cut". */
  detail: string;
  /** Flitch serials the faces came from (one, unless a repair took a leaf from another). */
  flitches: string[];
  faces: Record<Side, VeneerFace>;
}

export interface FinalTestFigure {
  at: Date;
  pass: boolean;
  maxDiffDb: number;
  /** Nominal one-third-octave band of the largest difference, e.g. "2.5k". */
  worstBand: string;
  limitDb: number;
  minHz: number;
  maxHz: number;
  /** [hz, dB] as measured. */
  left: [number, number][];
  right: [number, number][];
}

export type SignatureStep = "tested" | "inspected" | "packed";

/** A part fitted into one of the speakers after the pair was built: a repair. */
export interface Replacement {
  side: Side;
  /** Model position code, "T", "B2", or "XO". */
  position: string;
  part: string;
  /** The serial fitted. */
  fitted: string;
  /** The serial it took the place of, when one was taken out there. */
  replaced: string | null;
  at: Date;
}

export interface Signature {
  step: SignatureStep;
  /** "Tested by" */
  label: string;
  /** Null: recorded without a name (history before people signed in). */
  name: string | null;
  at: Date | null;
  /** What the signature vouches for. */
  meaning: string;
}

/** A revision of the certificate, issued after a repair and a passing re-test. */
export interface RevisionFigure {
  id: string;
  /** 2, 3…: the original is revision 1. */
  number: number;
  issuedAt: Date;
  /** The owner's line: "Right speaker's tweeter replaced on 4 December 2026 after a service visit". */
  repairLine: string;
  repairedAt: Date;
}

/** Everything the certificate prints, read from the register. */
export interface CertificateData {
  certificateId: string;
  code: string;
  verifyUrl: string;
  issuedAt: Date;
  /** A reprint: marked COPY, with the date of the original. */
  copy: boolean;
  pair: { id: string; identity: string; state: string };
  model: { code: string; name: string };
  finish: { code: string; name: string; kind: "veneer" | "lacquer"; detail: string } | null;
  /** When the two speakers were put together as the pair (the build month is printed). */
  builtAt: Date | null;
  speakers: Record<Side, { identity: string; cabinet: string | null }>;
  /** Null for lacquered pairs. */
  veneer: VeneerOrigin | null;
  positions: PositionRow[];
  /** The speakers' metal trim parts with their supplier's lots; empty for a model without trim. */
  trim: TrimRow[];
  finalTest: FinalTestFigure | null;
  /** Only the steps done by the time of printing: a pair not yet packed has no packing line. */
  signatures: Signature[];
  /** When it was packed and into which carton; null while it waits to be packed. */
  packed: { at: Date; carton: string | null } | null;
  /** When it first left in a shipment; null while it is still in the workshop. */
  shipped: { at: Date } | null;
  /** When the original (the first print that was not a copy) was printed, of the revision printed when there is one; null if never. */
  originalPrintedAt: Date | null;
  /** Parts fitted after the pair was built, oldest first: the certificate shows the pair as it is now. */
  replacements: Replacement[];
  /** The revision printed (its code is the one in the link and QR code); null for the original. */
  revision: RevisionFigure | null;
}

const PART_ORDER: Record<string, number> = { tweeter: 0, midrange: 1, bass: 2, crossover: 3 };

/** A pair by its serial (checked and canonicalised when it parses), or null. */
export async function pairByIdentity(db: DbOrTx, identity: string) {
  const parsed = parseSerial(identity);
  const canonical = parsed?.valid ? parsed.canonical : identity.trim().toUpperCase();
  const [row] = await db.select().from(items).where(and(eq(items.identity, canonical), eq(items.kind, "pair"))).limit(1);
  return row ?? null;
}

async function pairById(db: DbOrTx, pairId: string) {
  const [row] = await db.select().from(items).where(and(eq(items.id, pairId), eq(items.kind, "pair"))).limit(1);
  if (!row) throw new AppError(404, "No pair with that serial.");
  return row;
}

async function newestFinalTest(db: DbOrTx, pairId: string) {
  const [row] = await db.select().from(finalTests).where(eq(finalTests.pairId, pairId)).orderBy(desc(finalTests.id)).limit(1);
  return row ?? null;
}

export async function certificateOf(db: DbOrTx, pairId: string): Promise<Certificate | null> {
  const [row] = await db.select().from(certificates).where(eq(certificates.pairId, pairId)).limit(1);
  return row ?? null;
}

/**
 * The pair's certificate: the existing one, or a new one with its "certificate.issued" event.
 * Refuses (409) a pair whose newest final test did not pass, unless the pair already left the
 * workshop (packed or shipped in the demo history, before final tests were recorded).
 */
export async function issueCertificate(db: Db, pairId: string, actorId: string | null): Promise<Certificate> {
  const existing = await certificateOf(db, pairId);
  if (existing) return existing;
  try {
    return await db.transaction((tx) => issueCertificateIn(tx, pairId, actorId));
  } catch (e) {
    // Another process issued it first: theirs is the certificate.
    if (isConstraintError(e, "UNIQUE")) {
      const won = await certificateOf(db, pairId);
      if (won) return won;
    }
    throw e;
  }
}

/**
 * `issueCertificate` inside the caller's write transaction (BEGIN IMMEDIATE): the existing
 * certificate, or a new one with its event. A revision issued after a repair needs the original first.
 */
export async function issueCertificateIn(tx: DbOrTx, pairId: string, actorId: string | null): Promise<Certificate> {
  // Read again inside the write transaction: no second issue can slip in between.
  const again = await certificateOf(tx, pairId);
  if (again) return again;
  const pair = await pairById(tx, pairId);
  const test = await newestFinalTest(tx, pairId);
  if (!test?.pass && !PAST_FINAL_TEST.has(pair.state)) throw new AppError(409, `${pair.identity} has no passing final test yet.`);
  const id = newId();
  const eventId = await appendEvent(tx, {
    actorId,
    station: "packing",
    type: "certificate.issued",
    subjectKind: "item",
    subjectId: pair.id,
    // The code stays out of the log: event data is readable by every signed-in user.
    data: { identity: pair.identity, certificateId: id, finalTestId: test?.id ?? null },
  });
  const [row] = await tx.insert(certificates).values({ id, pairId, code: certificateCode(), issuedAt: clockNow(), eventId }).returning();
  return row!;
}

interface Child {
  parentId: string;
  position: string;
  startedAt: Date;
  id: string;
  kind: string;
  identity: string;
  partType: string | null;
  attrs: Record<string, unknown>;
}

/**
 * The trim rows: the model's trim positions (by code; a count of n gives "TOP-1"…), then any other
 * trim part a speaker holds, each side with its supplier's lot (the lot sits in the part at SLOT).
 */
async function trimRows(db: DbOrTx, modelId: string, parts: Child[], partsOf: (side: Side) => Child[]): Promise<TrimRow[]> {
  const positions = await db.select().from(modelTrimPositions).where(eq(modelTrimPositions.modelId, modelId)).orderBy(asc(modelTrimPositions.position));
  const expected = new Map<string, string>();
  for (const p of positions) {
    if (p.count <= 1) expected.set(p.position, p.label);
    else for (let i = 1; i <= p.count; i++) expected.set(`${p.position}-${i}`, `${p.label} ${i}`);
  }
  const fitted = parts.filter((c) => c.kind === "trim_part");
  for (const c of fitted) if (!expected.has(c.position)) expected.set(c.position, positions.find((p) => p.position === c.partType)?.label ?? "Trim part");
  if (!expected.size) return [];
  const lots = await openChildren(db, fitted.map((c) => c.id));
  const lotOf = (id: string) => lots.find((l) => l.parentId === id && l.position === SUPPLIER_LOT_POSITION)?.identity ?? null;
  const at = (side: Side, position: string) => {
    const c = partsOf(side).find((x) => x.kind === "trim_part" && x.position === position);
    return c ? { identity: c.identity, lot: lotOf(c.id) } : null;
  };
  return [...expected].map(([position, label]) => ({ position, label, left: at("L", position), right: at("R", position) }));
}

async function openChildren(db: DbOrTx, parentIds: string[]): Promise<Child[]> {
  if (parentIds.length === 0) return [];
  return db
    .select({
      parentId: links.parentId,
      position: links.position,
      startedAt: links.startedAt,
      id: items.id,
      kind: items.kind,
      identity: items.identity,
      partType: items.partType,
      attrs: items.attrs,
    })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(inArray(links.parentId, parentIds), isNull(links.endedAt)));
}

/**
 * Parts fitted into the speakers after the pair was built (a repair), each with the serial it took
 * the place of: the link at the same speaker and position that ended last before it began.
 */
async function replacementsAfter(db: DbOrTx, speakers: Record<Side, Child>, builtAt: Date, current: Child[]): Promise<Replacement[]> {
  const late = current.filter((c) => (c.kind === "drive_unit" || c.kind === "crossover") && c.startedAt.getTime() > builtAt.getTime());
  if (late.length === 0) return [];
  const ended = await db
    .select({ parentId: links.parentId, position: links.position, endedAt: links.endedAt, identity: items.identity })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(inArray(links.parentId, [speakers.L.id, speakers.R.id]), isNotNull(links.endedAt)));
  return late
    .map((c) => {
      const side: Side = c.parentId === speakers.L.id ? "L" : "R";
      const before = ended
        .filter((e) => e.parentId === c.parentId && e.position === c.position && e.endedAt!.getTime() <= c.startedAt.getTime())
        .sort((a, b) => b.endedAt!.getTime() - a.endedAt!.getTime())[0];
      return { side, position: c.position, part: c.kind === "crossover" ? "crossover" : (c.partType ?? "drive unit"), fitted: c.identity, replaced: before?.identity ?? null, at: c.startedAt };
    })
    .sort((a, b) => a.at.getTime() - b.at.getTime() || a.side.localeCompare(b.side));
}

/** When the original was printed: the first "certificate.printed" of this certificate that was not a copy. */
async function originalPrint(db: DbOrTx, certificateId: string): Promise<Date | null> {
  const [row] = await db
    .select({ at: certificatePrints.printedAt })
    .from(certificatePrints)
    .where(and(eq(certificatePrints.certificateId, certificateId), eq(certificatePrints.original, true)))
    .limit(1);
  return row?.at ?? null;
}

/** When a revision's original was printed, if it was. */
async function originalRevisionPrint(db: DbOrTx, revisionId: string): Promise<Date | null> {
  const [row] = await db
    .select({ at: certificateRevisionPrints.printedAt })
    .from(certificateRevisionPrints)
    .where(and(eq(certificateRevisionPrints.revisionId, revisionId), eq(certificateRevisionPrints.original, true)))
    .limit(1);
  return row?.at ?? null;
}

/** The newest event of each key step on the pair, with who recorded it. */
async function keySteps(db: DbOrTx, pairId: string) {
  const rows = await db
    .select({ id: events.id, type: events.type, at: events.at, name: users.name, data: events.data })
    .from(events)
    .leftJoin(users, eq(users.id, events.actorId))
    .where(and(eq(events.subjectKind, "item"), eq(events.subjectId, pairId), inArray(events.type, ["pair.final_tested", "pair.inspected", "pair.packed"])))
    .orderBy(desc(events.id));
  const newest = new Map<string, (typeof rows)[number]>();
  for (const r of rows) if (!newest.has(r.type)) newest.set(r.type, r);
  return newest;
}

/** Face leaves of the pair's two cabinets, the replacement where a leaf was re-veneered. */
async function veneerFaces(db: DbOrTx, pairId: string, cabinets: Record<Side, Child | null>) {
  const rows = await db
    .select({
      id: leafAllocations.id,
      cabinetId: leafAllocations.cabinetId,
      position: leafAllocations.position,
      orientation: leafAllocations.orientation,
      leafIdentity: items.identity,
      leafState: items.state,
      seq: veneerLeaves.seq,
      flitchId: veneerLeaves.flitchId,
    })
    .from(leafAllocations)
    .innerJoin(items, eq(items.id, leafAllocations.leafId))
    .innerJoin(veneerLeaves, eq(veneerLeaves.itemId, leafAllocations.leafId))
    .where(and(eq(leafAllocations.pairId, pairId), eq(leafAllocations.role, "face")))
    .orderBy(leafAllocations.id);
  if (rows.length === 0) return null;
  const flitchIds = [...new Set(rows.map((r) => r.flitchId))];
  const flitchRows = await db.select({ id: items.id, identity: items.identity }).from(items).where(inArray(items.id, flitchIds));
  const flitchName = new Map(flitchRows.map((f) => [f.id, f.identity]));

  const faces = {} as Record<Side, VeneerFace>;
  for (const side of SIDES) {
    const cabinet = cabinets[side];
    const mine = rows.filter((r) => cabinet && r.cabinetId === cabinet.id);
    const byPosition = new Map<string, typeof mine>();
    for (const r of mine) byPosition.set(r.position!, [...(byPosition.get(r.position!) ?? []), r]);
    const leaves: VeneerLeafOnFace[] = [];
    for (const [position, list] of byPosition) {
      // A face keeps the record of every leaf it ever had; the one on it now is the newest not scrapped.
      const current = [...list].reverse().find((r) => r.leafState !== "scrapped") ?? list[list.length - 1]!;
      leaves.push({
        position,
        leafNo: current.seq,
        identity: current.leafIdentity,
        flitch: flitchName.get(current.flitchId) ?? "",
        orientation: current.orientation ?? (side === "R" ? "turned" : "as_cut"),
        replacement: current.id !== list[0]!.id,
      });
    }
    leaves.sort((a, b) => Number(a.position.slice(1)) - Number(b.position.slice(1)) || a.position.localeCompare(b.position));
    faces[side] = { cabinet: cabinet?.identity ?? "", leaves };
  }
  const used = new Set(SIDES.flatMap((s) => faces[s].leaves.map((l) => l.flitch)));
  return { faces, flitches: [...used].filter(Boolean).sort() };
}

function pointsOf(raw: unknown): [number, number][] {
  if (!Array.isArray(raw)) return [];
  return raw
    .filter((p): p is number[] => Array.isArray(p) && typeof p[0] === "number" && typeof p[1] === "number")
    .map((p) => [p[0]!, p[1]!] as [number, number])
    .sort((a, b) => a[0] - b[0]);
}

/**
 * Everything a pair's certificate prints: both speakers, the veneer origin, the parts at each
 * position with their match, the final test with both responses, who tested, inspected and packed
 * it, and where the pair stands as it is printed (packed, shipped, repaired), so that every printed
 * line is true at that moment. The certificate must have been issued (`issueCertificate`); `copy`
 * marks a reprint.
 */
export async function certificateData(db: DbOrTx, pairId: string, opts: { baseUrl: string; copy: boolean; revisionId?: string | null }): Promise<CertificateData> {
  const pair = await pairById(db, pairId);
  const certificate = await certificateOf(db, pairId);
  if (!certificate) throw new AppError(409, `${pair.identity} has no certificate yet.`);
  let revision: (typeof certificateRevisions.$inferSelect) | null = null;
  if (opts.revisionId) {
    revision =
      (
        await db
          .select()
          .from(certificateRevisions)
          .where(and(eq(certificateRevisions.id, opts.revisionId), eq(certificateRevisions.certificateId, certificate.id)))
          .limit(1)
      )[0] ?? null;
    if (!revision) throw new AppError(404, `${pair.identity}'s certificate has no such revision.`);
  }
  const [model] = pair.modelId ? await db.select().from(models).where(eq(models.id, pair.modelId)).limit(1) : [];
  if (!model) throw new AppError(409, `${pair.identity} has no model.`);
  const [finish] = pair.finishId ? await db.select().from(finishes).where(eq(finishes.id, pair.finishId)).limit(1) : [];

  const held = await openChildren(db, [pair.id]);
  const speakers = { L: held.find((c) => c.position === "L" && c.kind === "speaker") ?? null, R: held.find((c) => c.position === "R" && c.kind === "speaker") ?? null };
  if (!speakers.L || !speakers.R) throw new AppError(409, `${pair.identity} does not hold two speakers.`);
  const builtAt = new Date(Math.max(speakers.L.startedAt.getTime(), speakers.R.startedAt.getTime()));

  const parts = await openChildren(db, [speakers.L.id, speakers.R.id]);
  const partsOf = (side: Side) => parts.filter((c) => c.parentId === speakers[side]!.id);
  const cabinets = { L: partsOf("L").find((c) => c.position === "CAB") ?? null, R: partsOf("R").find((c) => c.position === "CAB") ?? null };

  // Positions: the model's (a count of n gives P1…Pn), then anything else a speaker holds.
  const modelRows = await db.select().from(modelPositions).where(eq(modelPositions.modelId, model.id));
  const expected = new Map<string, string>();
  for (const p of modelRows) {
    if (p.count === 1) expected.set(p.position, p.partType);
    else for (let i = 1; i <= p.count; i++) expected.set(`${p.position}${i}`, p.partType);
  }
  for (const c of parts) {
    if (c.kind === "drive_unit" && !expected.has(c.position)) expected.set(c.position, c.partType ?? "drive unit");
    if (c.kind === "crossover") expected.set(c.position, "crossover");
  }
  const fitted = parts.filter((c) => c.kind === "drive_unit" || c.kind === "crossover");
  const memberships = fitted.length
    ? await db
        .select({ itemId: setMembers.itemId, side: setMembers.side, setId: matchedSets.id, code: matchedSets.code, maxDiffDb: matchedSets.maxDiffDb, limitDb: matchedSets.limitDb })
        .from(setMembers)
        .innerJoin(matchedSets, eq(matchedSets.id, setMembers.setId))
        .where(inArray(setMembers.itemId, fitted.map((c) => c.id)))
    : [];
  const positions: PositionRow[] = [...expected]
    .map(([position, part]) => {
      const left = partsOf("L").find((c) => c.position === position) ?? null;
      const right = partsOf("R").find((c) => c.position === position) ?? null;
      const set = left && right
        ? memberships.find((m) => m.itemId === left.id && memberships.some((o) => o.setId === m.setId && o.itemId === right.id && o.side !== m.side))
        : undefined;
      return {
        position,
        part,
        left: left?.identity ?? null,
        right: right?.identity ?? null,
        match: set ? { setCode: set.code, maxDiffDb: set.maxDiffDb, limitDb: set.limitDb } : null,
      };
    })
    .sort((a, b) => (PART_ORDER[a.part] ?? 2.5) - (PART_ORDER[b.part] ?? 2.5) || a.position.localeCompare(b.position));

  const trim = await trimRows(db, model.id, parts, partsOf);

  let veneer: VeneerOrigin | null = null;
  if (finish?.kind === "veneer") {
    const faces = await veneerFaces(db, pair.id, cabinets);
    if (faces) veneer = { species: finish.name, detail: finishDetail(finish), flitches: faces.flitches, faces: faces.faces };
  }

  const test = await newestFinalTest(db, pair.id);
  let finalTest: FinalTestFigure | null = null;
  if (test) {
    const rs = await db.select({ id: responses.id, points: responses.points }).from(responses).where(inArray(responses.id, [test.leftResponseId, test.rightResponseId]));
    finalTest = {
      at: test.createdAt,
      pass: test.pass,
      maxDiffDb: test.maxDiffDb,
      worstBand: test.worstBand,
      limitDb: test.limitDb,
      minHz: model.responseMinHz,
      maxHz: model.responseMaxHz,
      left: pointsOf(rs.find((r) => r.id === test.leftResponseId)?.points),
      right: pointsOf(rs.find((r) => r.id === test.rightResponseId)?.points),
    };
  }

  const steps = await keySteps(db, pair.id);
  const limit = formatDb(finalTest?.limitDb ?? model.pairResponseLimitDb);
  // A line only for a step the register holds: printed before packing, there is no packing line.
  const sign = (step: SignatureStep, type: string, label: string, meaning: string): Signature[] => {
    const e = steps.get(type);
    return e ? [{ step, label, name: e.name ?? null, at: e.at, meaning }] : [];
  };
  const signatures: Signature[] = [
    ...sign("tested", "pair.final_tested", "Tested by", `measured both speakers and found them within ±${limit} dB of each other from ${formatHz(model.responseMinHz)} to ${formatHz(model.responseMaxHz)}`),
    ...sign("inspected", "pair.inspected", "Inspected by", "checked the finish and the build after the final clean"),
    ...sign("packed", "pair.packed", "Packed by", "packed the pair with the items on the model's packing list"),
  ];
  const packedEvent = steps.get("pair.packed");
  const packed = packedEvent ? { at: packedEvent.at, carton: typeof packedEvent.data.carton === "string" ? packedEvent.data.carton : null } : null;
  const [shippedOn, originalPrintedAt, replacements] = await Promise.all([
    shippedAt(db, pair.id),
    revision ? originalRevisionPrint(db, revision.id) : originalPrint(db, certificate.id),
    replacementsAfter(db, { L: speakers.L, R: speakers.R }, builtAt, parts),
  ]);

  return {
    certificateId: certificate.id,
    code: revision?.code ?? certificate.code,
    verifyUrl: verifyUrl(opts.baseUrl, revision?.code ?? certificate.code),
    issuedAt: certificate.issuedAt,
    copy: opts.copy,
    pair: { id: pair.id, identity: pair.identity, state: pair.state },
    model: { code: model.code, name: model.name },
    finish: finish ? { code: finish.code, name: finish.name, kind: finish.kind, detail: finishDetail(finish) } : null,
    builtAt,
    speakers: { L: { identity: speakers.L.identity, cabinet: cabinets.L?.identity ?? null }, R: { identity: speakers.R.identity, cabinet: cabinets.R?.identity ?? null } },
    veneer,
    positions,
    trim,
    finalTest,
    signatures,
    packed,
    shipped: shippedOn ? { at: shippedOn } : null,
    originalPrintedAt,
    replacements,
    revision: revision ? { id: revision.id, number: revision.revision, issuedAt: revision.issuedAt, repairLine: revision.repairLine, repairedAt: revision.repairedAt } : null,
  };
}
