import "server-only";
import { refuseQuarantinedIn, withoutQuarantined, type Quarantined } from "./quarantine";
import type { LabActor } from "@/lib/vocabulary/actor";
import { and, asc, desc, eq, inArray, isNull, like, sql, type AnyColumn } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { batchUnits, caseReservations, items, matchedSets, modelTolerances, models, responses, serviceCases, setMembers, tsParams, unitBatches, type Item } from "@/db/schema";
import { partWord, type PartType } from "@/lib/vocabulary/part-types";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";
import { changeState, createItem, fit, itemByIdentity, type Recorder } from "@/lib/genealogy/graph";
import { KIND_WORD } from "@/lib/vocabulary/item-kinds";
import { BATCH_POSITION, MAKER_LOT_POSITION } from "@/lib/vocabulary/positions";
import { batchCode, makerLotIdentity } from "@/lib/serials/lots";
import { bandLabel, bandLevels, checkTsParams, formatDb, formatLimitDb, parseResponseFile, thirdOctaveBands, TS_FIELDS } from "@/lib/acoustics";
import { hasAllowedPair, LIMIT_EPSILON_DB, pairCost, planPairs } from "@/lib/matching";
import { allocateSerial } from "@/lib/serials/allocator";
import { batchCountMismatch } from "./batch-count";
import { whyNoPairs } from "./plan-words";
import { modelsTakingPartType } from "./queries";
import { readTsCsv } from "./ts-csv";
import { bandsOf, keepBandLevels, PASSBANDS, pointsOfResponses } from "./response-bands";
import { countUnits, type UnitCounts } from "./unit-counts";
import { PART_TYPE_CODES, parseSerial } from "@/lib/serials/format";

export const LAB_STATION = "lab";

/** Who records: a signed-in user, or a test bench with a machine token (actor null, the token named in the data). */
const recorder = (actor: LabActor): Recorder => ({ actorId: actor.id, station: actor.machine ? "lab-bench" : LAB_STATION });
const machineData = (actor: LabActor) => (actor.machine ? { machineTokenId: actor.machine.id, machineTokenName: actor.machine.name } : {});

export { PASSBANDS } from "./response-bands";

// ---- batches ------------------------------------------------------------------------------------

export interface BatchIntake {
  partType: PartType;
  partNumber: string;
  maker: string;
  lot: string;
  receivedOn: string;
  /** Scanned from the makers' labels, one per unit; or empty to register `count` units. */
  makerSerials: string[];
  count: number;
}

/**
 * Registers a batch and its units, each with a Twinleaf serial (and the maker's serial where scanned).
 * With serials scanned the batch holds one unit per serial; a number of units that disagrees with
 * them is refused and nothing is written.
 */
export async function registerBatch(db: DbOrTx, input: BatchIntake, actor: LabActor) {
  const serials = input.makerSerials.map((s) => s.trim()).filter(Boolean);
  const mismatch = batchCountMismatch(input.count, serials.length);
  if (mismatch) throw new AppError(400, `Nothing was registered: ${mismatch}`, { count: [mismatch] });
  const count = serials.length || input.count;
  if (count < 1 || count > 500) throw new AppError(400, "A batch holds 1 to 500 units.", { count: ["1 to 500 units."] });
  const dup = serials.find((s, i) => serials.indexOf(s) !== i);
  if (dup) throw new AppError(400, `The maker's serial ${dup} is scanned twice.`, { makerSerials: [`${dup} appears twice.`] });
  const code = PART_TYPE_CODES[input.partType];
  return db.transaction(async (tx) => {
    const month = input.receivedOn.slice(2, 4) + input.receivedOn.slice(5, 7);
    const [n] = await tx.select({ n: sql<number>`count(*)` }).from(unitBatches).where(like(unitBatches.code, `${code}-${month}-%`));
    // The batch becomes a register item named by its code: skip a code some other item already uses.
    let seq = Number(n?.n ?? 0) + 1;
    let candidate = batchCode(input.partType, input.receivedOn, seq);
    while (await itemByIdentity(tx, candidate)) candidate = batchCode(input.partType, input.receivedOn, ++seq);
    const batchCodeText = candidate;
    const id = newId();
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: LAB_STATION,
      type: "batch.received",
      subjectKind: "batch",
      subjectId: id,
      data: { code: batchCodeText, partType: input.partType, partNumber: input.partNumber, maker: input.maker, lot: input.lot, count, ...machineData(actor) },
    });
    await tx.insert(unitBatches).values({ id, code: batchCodeText, partType: input.partType, partNumber: input.partNumber, maker: input.maker, lot: input.lot, receivedOn: input.receivedOn, eventId, createdAt: now() });
    const by = recorder(actor);
    const { batchItem } = await batchSourceItems(tx, { code: batchCodeText, partType: input.partType, partNumber: input.partNumber, maker: input.maker, lot: input.lot, receivedOn: input.receivedOn }, by);
    const year = Number(input.receivedOn.slice(0, 4));
    const units: Item[] = [];
    for (let i = 0; i < count; i++) {
      const makerSerial = serials[i] ?? null;
      const unit = await createItem(
        tx,
        {
          kind: "drive_unit",
          identity: await allocateSerial(tx, { kind: "drive_unit", code, year }),
          partType: input.partType,
          state: "awaiting_measurement",
          attrs: { maker: input.maker, partNumber: input.partNumber, batch: batchCodeText, ...(makerSerial ? { makerSerial } : {}) },
        },
        by,
      );
      await tx.insert(batchUnits).values({ itemId: unit.id, batchId: id, makerSerial });
      // The unit sits in its batch from the moment it is received, so a trace of the batch reaches it.
      await fit(tx, { parent: unit, child: batchItem, position: BATCH_POSITION }, by);
      units.push(unit);
    }
    return { id, code: batchCodeText, units, itemId: batchItem.id };
  });
}

/**
 * The register items of a new batch and of the maker's lot it came from (made once, shared by every
 * batch of that lot), the lot fitted into the batch. Call inside the batch's transaction.
 */
async function batchSourceItems(
  tx: DbOrTx,
  b: { code: string; partType: PartType; partNumber: string; maker: string; lot: string; receivedOn: string },
  by: Recorder,
): Promise<{ batchItem: Item; lotItem: Item }> {
  const lotIdentity = makerLotIdentity(b.maker, b.lot);
  let lotItem = await itemByIdentity(tx, lotIdentity);
  if (lotItem && lotItem.kind !== "maker_lot") {
    throw new AppError(409, `Nothing was registered: ${lotIdentity} is already the name of a ${KIND_WORD[lotItem.kind]} in the register. Check the maker and the lot.`, {
      lot: ["Already used by something else in the register."],
    });
  }
  lotItem ??= await createItem(tx, { kind: "maker_lot", identity: lotIdentity, state: "received", partType: b.partType, attrs: { maker: b.maker, lot: b.lot } }, by);
  const batchItem = await createItem(
    tx,
    { kind: "unit_batch", identity: b.code, state: "received", partType: b.partType, attrs: { maker: b.maker, partNumber: b.partNumber, lot: b.lot, receivedOn: b.receivedOn } },
    by,
  );
  await fit(tx, { parent: batchItem, child: lotItem, position: MAKER_LOT_POSITION }, by);
  return { batchItem, lotItem };
}

export async function batchByCode(db: DbOrTx, code: string) {
  const [b] = await db.select().from(unitBatches).where(eq(unitBatches.code, code)).limit(1);
  return b ?? null;
}

export interface UnitRow {
  id: string;
  identity: string;
  makerSerial: string | null;
  state: string;
  responseId: number | null;
  responseAt: Date | null;
  points: number[][] | null;
  fsHz: number | null;
  qts: number | null;
  qes: number | null;
  qms: number | null;
  reOhm: number | null;
  vasL: number | null;
  sensitivityDb: number | null;
  setCode: string | null;
  /** The service case that holds it for a repair, if one does. */
  caseCode: string | null;
}

/** A batch's units with their newest response and Thiele–Small set, and the set or service case that holds them. */
export async function batchUnitsView(db: DbOrTx, batchId: string, opts: { withPoints?: boolean } = {}): Promise<UnitRow[]> {
  const rows = await db
    .select({ id: items.id, identity: items.identity, state: items.state, makerSerial: batchUnits.makerSerial })
    .from(batchUnits)
    .innerJoin(items, eq(items.id, batchUnits.itemId))
    .where(eq(batchUnits.batchId, batchId))
    .orderBy(asc(items.identity));
  return unitRowsOf(db, rows, opts);
}

/**
 * Drive units of a part type free to match, from every batch: measured (or back in stock), held
 * by no open matched set, by no open service-case reservation and by no open containment. The service desk ranks
 * replacements from these with the lab's own loading (`unitRowsOf`, `matchUnitsOf`).
 */
export async function freeUnitRows(db: DbOrTx, partType: PartType, opts: { withPoints?: boolean } = {}): Promise<UnitRow[]> {
  const rows = await db
    .select({ id: items.id, identity: items.identity, state: items.state, makerSerial: batchUnits.makerSerial })
    .from(items)
    .leftJoin(batchUnits, eq(batchUnits.itemId, items.id))
    .where(
      and(
        eq(items.kind, "drive_unit"),
        eq(items.partType, partType),
        inArray(items.state, ["measured", "in_stock"]),
        sql`NOT EXISTS (SELECT 1 FROM ${setMembers} sm WHERE sm.item_id = ${items.id} AND sm.ended_at IS NULL)`,
        sql`NOT EXISTS (SELECT 1 FROM ${caseReservations} cr WHERE cr.item_id = ${items.id} AND cr.ended_at IS NULL)`,
      ),
    )
    .orderBy(asc(items.identity));
  // Quarantined by an open containment: not free until quality releases it.
  return unitRowsOf(db, (await withoutQuarantined(db, rows)).free, opts);
}

/** Units (any state) with their newest response and Thiele–Small set, and the set or service case that holds them now. */
export async function unitRowsOf(
  db: DbOrTx,
  rows: { id: string; identity: string; state: string; makerSerial: string | null }[],
  opts: { withPoints?: boolean } = {},
): Promise<UnitRow[]> {
  const ids = rows.map((r) => r.id);
  if (!ids.length) return [];
  // One JSON parameter rather than one per unit: a batch can hold hundreds.
  const among = (column: AnyColumn) => sql`${column} IN (SELECT value FROM json_each(${JSON.stringify(ids)}))`;
  const latestResponse = await db
    .select({ id: responses.id, itemId: responses.itemId, createdAt: responses.createdAt, ...(opts.withPoints ? { points: responses.points } : {}) })
    .from(responses)
    .where(and(among(responses.itemId), eq(responses.purpose, "unit"), sql`${responses.id} = (SELECT max(r2.id) FROM responses r2 WHERE r2.item_id = ${responses.itemId} AND r2.purpose = 'unit')`));
  const latestTs = await db
    .select()
    .from(tsParams)
    .where(and(among(tsParams.itemId), sql`${tsParams.id} = (SELECT max(t2.id) FROM ts_params t2 WHERE t2.item_id = ${tsParams.itemId})`));
  const sets = await db
    .select({ itemId: setMembers.itemId, code: matchedSets.code })
    .from(setMembers)
    .innerJoin(matchedSets, eq(matchedSets.id, setMembers.setId))
    .where(and(among(setMembers.itemId), isNull(setMembers.endedAt)));
  const cases = await db
    .select({ itemId: caseReservations.itemId, code: serviceCases.code })
    .from(caseReservations)
    .innerJoin(serviceCases, eq(serviceCases.id, caseReservations.caseId))
    .where(and(among(caseReservations.itemId), isNull(caseReservations.endedAt)));
  const responseOf = new Map(latestResponse.map((x) => [x.itemId, x]));
  const tsOf = new Map(latestTs.map((x) => [x.itemId, x]));
  const setOf = new Map(sets.map((x) => [x.itemId, x.code]));
  const caseOf = new Map(cases.map((x) => [x.itemId, x.code]));
  return rows.map((r) => {
    const resp = responseOf.get(r.id);
    const ts = tsOf.get(r.id);
    return {
      ...r,
      responseId: resp?.id ?? null,
      responseAt: resp?.createdAt ?? null,
      points: (resp as { points?: number[][] } | undefined)?.points ?? null,
      fsHz: ts?.fsHz ?? null,
      qts: ts?.qts ?? null,
      qes: ts?.qes ?? null,
      qms: ts?.qms ?? null,
      reOhm: ts?.reOhm ?? null,
      vasL: ts?.vasL ?? null,
      sensitivityDb: ts?.sensitivityDb ?? null,
      setCode: setOf.get(r.id) ?? null,
      caseCode: caseOf.get(r.id) ?? null,
    };
  });
}

// ---- measurements -------------------------------------------------------------------------------

/**
 * Finds a unit by its Twinleaf serial, or by the maker's serial (within a batch when one is given).
 * With `boards`, a crossover board's serial is found too (boards have no batch and no maker's
 * serial): its response may be measured after it was built.
 */
export async function findUnit(db: DbOrTx, text: string, batchId?: string, opts: { boards?: boolean } = {}): Promise<Item | null> {
  const parsed = parseSerial(text);
  if (parsed?.valid && (parsed.kind === "drive_unit" || (opts.boards && parsed.kind === "crossover"))) {
    const [row] = await db.select().from(items).where(and(eq(items.identity, parsed.canonical), eq(items.kind, parsed.kind))).limit(1);
    // On a batch's page a serial of another batch is not "a unit of this batch".
    if (row && batchId) {
      const [member] = await db.select({ id: batchUnits.itemId }).from(batchUnits).where(and(eq(batchUnits.itemId, row.id), eq(batchUnits.batchId, batchId))).limit(1);
      return member ? row : null;
    }
    if (row) return row;
  }
  const byMaker = await db
    .select({ item: items })
    .from(batchUnits)
    .innerJoin(items, eq(items.id, batchUnits.itemId))
    .where(and(eq(batchUnits.makerSerial, text.trim()), batchId ? eq(batchUnits.batchId, batchId) : undefined))
    .limit(2);
  if (byMaker.length === 1) return byMaker[0]!.item;
  return null;
}

const MEASURABLE = new Set(["awaiting_measurement", "measured", "in_stock"]);

async function measurableUnit(tx: DbOrTx, itemId: string) {
  const [unit] = await tx.select().from(items).where(eq(items.id, itemId)).limit(1);
  if (!unit || (unit.kind !== "drive_unit" && unit.kind !== "crossover")) throw new AppError(404, "That unit is not in the register.");
  if (unit.kind === "drive_unit" && !MEASURABLE.has(unit.state)) throw new AppError(409, `${unit.identity} is ${unit.state.replace(/_/g, " ")}: it can no longer be measured as a loose unit.`);
  // A board is measured while it waits in stock: once paired, its pairing rests on the response it had.
  if (unit.kind === "crossover" && unit.state !== "in_stock") throw new AppError(409, `${unit.identity} is ${unit.state.replace(/_/g, " ")}: a board is measured while it is in stock, before it is paired.`);
  return unit;
}

export interface ResponseInput {
  itemId: string;
  points: { hz: number; db: number; phaseDeg?: number }[];
  fileName: string | null;
  source: "form" | "csv" | "upload" | "api";
}

async function insertResponse(tx: DbOrTx, input: ResponseInput, actor: LabActor) {
  const unit = await measurableUnit(tx, input.itemId);
  const eventId = await appendEvent(tx, {
    actorId: actor.id,
    station: actor.machine ? "lab-bench" : LAB_STATION,
    type: "unit.response_measured",
    subjectKind: "item",
    subjectId: unit.id,
    data: { identity: unit.identity, points: input.points.length, fromHz: input.points[0]?.hz, toHz: input.points.at(-1)?.hz, fileName: input.fileName, source: input.source, ...machineData(actor) },
  });
  const points = input.points.map((p) => (p.phaseDeg === undefined ? [p.hz, p.db] : [p.hz, p.db, p.phaseDeg]));
  const [row] = await tx.insert(responses).values({ itemId: unit.id, points, fileName: input.fileName, source: input.source, eventId, createdAt: now() }).returning({ id: responses.id });
  if (unit.kind === "drive_unit") await keepBandLevels(tx, row!.id, unit.partType, points);
  if (unit.state === "awaiting_measurement") await changeState(tx, unit, "measured", recorder(actor));
  return unit;
}

/**
 * Reads response files and records each for the unit it names (Twinleaf or maker serial in the
 * first line or the file name; outside a batch, a crossover board's serial too). Every file is
 * checked first: if any is bad or names no unit, nothing is written and each problem is reported
 * with its file and line.
 */
export async function importResponseFiles(db: DbOrTx, files: { name: string; text: string }[], opts: { batchId?: string; source: "upload" | "api" }, actor: LabActor) {
  if (!files.length) throw new AppError(400, "Choose at least one response file.");
  const problems: string[] = [];
  const parsed: { name: string; unit: Item; points: { hz: number; db: number; phaseDeg?: number }[] }[] = [];
  const seen = new Map<string, string>();
  for (const f of files) {
    const result = parseResponseFile(f.text, { name: f.name });
    if (!result.ok) {
      for (const e of result.errors.slice(0, 5)) problems.push(`${f.name}, line ${e.line}: ${e.message}`);
      continue;
    }
    const hint = result.serialHint ?? f.name.replace(/\.[A-Za-z0-9]+$/, "");
    // Outside a batch a file may be a crossover board's, named by its serial.
    const find = (text: string) => findUnit(db, text, opts.batchId, { boards: !opts.batchId });
    const unit = (result.serialHint ? await find(result.serialHint) : null) ?? (await find(hint));
    if (!unit) {
      problems.push(`${f.name}: names no unit of ${opts.batchId ? "this batch" : "the register"} (put the unit's serial or the maker's serial in the first line or the file name).`);
      continue;
    }
    if (unit.kind === "crossover" && unit.state !== "in_stock") {
      problems.push(`${f.name}: ${unit.identity} is ${unit.state.replace(/_/g, " ")}; a board is measured while it is in stock, before it is paired.`);
      continue;
    }
    if (seen.has(unit.id)) {
      problems.push(`${f.name}: ${unit.identity} is also measured by ${seen.get(unit.id)}; send one file per unit.`);
      continue;
    }
    seen.set(unit.id, f.name);
    parsed.push({ name: f.name, unit, points: result.points });
  }
  if (problems.length) throw new AppError(400, `Nothing was saved: ${problems.length} problem${problems.length === 1 ? "" : "s"} in the files.`, { files: problems });
  return db.transaction(async (tx) => {
    const out: { file: string; unit: string }[] = [];
    for (const p of parsed) {
      await insertResponse(tx, { itemId: p.unit.id, points: p.points, fileName: p.name, source: opts.source }, actor);
      out.push({ file: p.name, unit: p.unit.identity });
    }
    return out;
  });
}

export interface TsInput {
  fsHz: number | null;
  qts: number | null;
  qes: number | null;
  qms: number | null;
  reOhm: number | null;
  vasL: number | null;
  sensitivityDb: number | null;
}

/** Checks a Thiele–Small set and fills in a derived Qts; returns field errors when it does not hold together. */
export function checkedTs(input: TsInput): { ok: true; value: TsInput } | { ok: false; fieldErrors: Record<string, string[]> } {
  const result = checkTsParams({ fs: input.fsHz, qts: input.qts, qes: input.qes, qms: input.qms, re: input.reOhm, vas: input.vasL, sensitivity: input.sensitivityDb });
  if (!result.ok) {
    const map: Record<string, string> = { fs: "fsHz", re: "reOhm", vas: "vasL", sensitivity: "sensitivityDb" };
    // In the form's order (Fs, Qts, Qes, Qms, Re, Vas, sensitivity), so a row's problems read left to right.
    const ordered = TS_FIELDS.filter((f) => result.fieldErrors[f.key]).map((f) => [map[f.key] ?? f.key, result.fieldErrors[f.key]!]);
    return { ok: false, fieldErrors: Object.fromEntries(ordered) };
  }
  return { ok: true, value: { ...input, qts: result.values.qts ?? input.qts } };
}

async function insertTs(tx: DbOrTx, itemId: string, ts: TsInput, source: "form" | "csv" | "api", actor: LabActor) {
  const unit = await measurableUnit(tx, itemId);
  const eventId = await appendEvent(tx, {
    actorId: actor.id,
    station: actor.machine ? "lab-bench" : LAB_STATION,
    type: "unit.ts_measured",
    subjectKind: "item",
    subjectId: unit.id,
    data: { identity: unit.identity, ...ts, source, ...machineData(actor) },
  });
  await tx.insert(tsParams).values({ itemId: unit.id, ...ts, source, eventId, createdAt: now() });
}

/** One unit's measurement from the form: a response file, a Thiele–Small set, or both, in one go. */
export async function recordMeasurement(db: DbOrTx, input: { itemId: string; response: { name: string; text: string } | null; ts: TsInput | null }, actor: LabActor) {
  let points: { hz: number; db: number; phaseDeg?: number }[] | null = null;
  if (input.response) {
    const result = parseResponseFile(input.response.text, { name: input.response.name });
    if (!result.ok) {
      throw new AppError(400, `The response file was not saved: ${result.errors.length} problem${result.errors.length === 1 ? "" : "s"}.`, {
        response: result.errors.slice(0, 10).map((e) => `Line ${e.line}: ${e.message}`),
      });
    }
    points = result.points;
  }
  let ts: TsInput | null = null;
  if (input.ts && Object.values(input.ts).some((v) => v !== null)) {
    const checked = checkedTs(input.ts);
    if (!checked.ok) throw new AppError(400, "Some parameters need attention.", checked.fieldErrors);
    ts = checked.value;
  }
  if (!points && !ts) throw new AppError(400, "Give a response file, Thiele–Small parameters, or both.");
  await db.transaction(async (tx) => {
    if (points) await insertResponse(tx, { itemId: input.itemId, points, fileName: input.response!.name, source: "form" }, actor);
    if (ts) await insertTs(tx, input.itemId, ts, "form", actor);
  });
}

/** One row of Thiele–Small parameters for a unit named by its Twinleaf or maker serial; `problems` are what its reading already found. */
export interface TsRowInput {
  line: number;
  serial: string;
  ts: TsInput;
  problems?: string[];
}

/** "Fs (Hz) must be between 5 and 40000 Hz; 0 looks mistyped" → the same, ending in one full stop. */
const sentence = (m: string) => (/[.!?]$/.test(m) ? m : `${m}.`);

/**
 * Thiele–Small sets for many units at once (CSV or JSON), in one pass: every row is checked in
 * full (its own problems, whether its serial names a unit, whether it names a unit another row
 * names too, and every parameter), and every problem of every row is reported together, with its
 * line, under `csv`. Nothing is written unless every row is good; then all rows in one transaction.
 * `fileProblems` (a CSV's columns, say) are reported first and also refuse the whole lot.
 */
export async function importTsRows(db: DbOrTx, rows: TsRowInput[], opts: { batchId?: string; source: "csv" | "api" }, actor: LabActor, fileProblems: string[] = []) {
  const problems: { line: number; text: string }[] = [];
  const ready: { unit: Item; ts: TsInput }[] = [];
  const lineOfUnit = new Map<string, number>();
  for (const r of rows) {
    const at = r.serial ? `Line ${r.line} (${r.serial})` : `Line ${r.line}`;
    const own = (r.problems ?? []).map((p) => ({ line: r.line, text: `Line ${r.line}: ${sentence(p)}` }));
    const found: { line: number; text: string }[] = [...own];
    const unit = r.serial ? await findUnit(db, r.serial, opts.batchId) : null;
    if (r.serial && !unit) found.push({ line: r.line, text: `Line ${r.line}: ${r.serial} is not a unit of ${opts.batchId ? "this batch" : "the register"}.` });
    if (unit) {
      // The same unit under its Twinleaf serial on one line and its maker's on another.
      const earlier = lineOfUnit.get(unit.id);
      if (earlier !== undefined && !own.some((p) => p.text.includes("already has a row"))) found.push({ line: r.line, text: `${at}: ${unit.identity} is also on line ${earlier}; give each unit one row.` });
      else if (earlier === undefined) lineOfUnit.set(unit.id, r.line);
    }
    const checked = checkedTs(r.ts);
    if (!checked.ok) for (const m of Object.values(checked.fieldErrors).flat()) found.push({ line: r.line, text: `${at}: ${sentence(m)}` });
    if (found.length) problems.push(...found);
    else if (unit && checked.ok) ready.push({ unit, ts: checked.value });
  }
  const all = [...fileProblems, ...problems.sort((x, y) => x.line - y.line).map((p) => p.text)];
  if (all.length) {
    const badRows = new Set(problems.map((p) => p.line)).size;
    const where = [fileProblems.length ? "the columns" : "", badRows ? `${badRows} row${badRows === 1 ? "" : "s"}` : ""].filter(Boolean).join(" and ");
    throw new AppError(400, `Nothing was saved: ${all.length} problem${all.length === 1 ? "" : "s"} in ${where}. Correct them all and bring the file in again.`, { csv: all });
  }
  await db.transaction(async (tx) => {
    for (const r of ready) await insertTs(tx, r.unit.id, r.ts, opts.source, actor);
  });
  return ready.length;
}

/** A Thiele–Small CSV brought in from the batch page: read, checked against the register, and saved only when all of it is good. */
export async function importTsCsv(db: DbOrTx, text: string, opts: { batchId: string }, actor: LabActor) {
  const read = readTsCsv(text);
  if (read.rows.length === 0 && read.fileProblems.length === 0) throw new AppError(400, "Nothing was saved: the CSV has a header but no rows.", { csv: ["Add one row per unit under the header."] });
  return importTsRows(db, read.rows, { batchId: opts.batchId, source: "csv" }, actor, read.fileProblems);
}

/** A unit that fails the bench is set aside with its reason. */
export async function failUnit(db: DbOrTx, input: { itemId: string; reason: string }, actor: LabActor) {
  await db.transaction(async (tx) => {
    const unit = await measurableUnit(tx, input.itemId);
    await changeState(tx, unit, "failed", { ...recorder(actor), reason: input.reason }, machineData(actor));
  });
}

// ---- matching -----------------------------------------------------------------------------------

export async function limitFor(db: DbOrTx, modelId: string, partType: PartType) {
  const [row] = await db
    .select({ limit: modelTolerances.mismatchLimitDb, model: models })
    .from(modelTolerances)
    .innerJoin(models, eq(models.id, modelTolerances.modelId))
    .where(and(eq(modelTolerances.modelId, modelId), eq(modelTolerances.partType, partType)))
    .limit(1);
  return row ?? null;
}

/** A unit as planning takes it: `id` is the unit's serial, so the plan and its reasons name units as people know them. */
export interface PlanUnit {
  id: string;
  itemId: string;
  identity: string;
  levels: number[];
  fs?: number;
  qts?: number;
}

export interface MatchView {
  bands: ReturnType<typeof thirdOctaveBands>;
  /** With each unit's response, for the pictures. */
  units: (PlanUnit & { points: number[][] })[];
  notReady: { identity: string; reason: string }[];
  /** Units that would be free but an open containment quarantines: left out of the plan. */
  quarantined: Quarantined[];
  plan: ReturnType<typeof planPairs>;
  limitDb: number;
}

/**
 * Units as matching takes them: band levels over `bands` from each row's newest response, with Fs
 * and Qts where measured; a unit with no response (or one that does not cover the bands) is not
 * ready, with the reason. Needs rows read `withPoints`.
 */
export function matchUnitsOf(rows: Pick<UnitRow, "id" | "identity" | "points" | "fsHz" | "qts">[], bands: ReturnType<typeof thirdOctaveBands>): { units: MatchView["units"]; notReady: MatchView["notReady"] } {
  const units: MatchView["units"] = [];
  const notReady: MatchView["notReady"] = [];
  for (const r of rows) {
    if (!r.points) {
      notReady.push({ identity: r.identity, reason: "no response measured yet" });
      continue;
    }
    try {
      const levels = bandLevels(r.points.map(([hz, db]) => ({ hz: hz!, db: db! })), bands);
      units.push({ id: r.identity, itemId: r.id, identity: r.identity, levels, points: r.points, ...(r.fsHz !== null ? { fs: r.fsHz } : {}), ...(r.qts !== null ? { qts: r.qts } : {}) });
    } catch (e) {
      notReady.push({ identity: r.identity, reason: (e as Error).message });
    }
  }
  return { units, notReady };
}

/**
 * The optimal plan for a batch's measured, unreserved units against a model's limit for the part
 * type, on one-third-octave bands over the part type's passband.
 */
export async function matchBatch(db: DbOrTx, batch: { id: string; partType: PartType }, opts: { limitDb: number; fsWeight?: number; qtsWeight?: number }): Promise<MatchView> {
  const { ready, failed } = readyOf(await batchUnitsView(db, batch.id, { withPoints: true }));
  const { free, quarantined } = await withoutQuarantined(db, ready);
  return matchViewOf(batch.partType, failed, matchUnitsOf(free, bandsOf(batch.partType)), quarantined, opts);
}

/** A batch's units that matching may consider (measured or back in stock, held by no set or case), and the failed ones. */
function readyOf(rows: UnitRow[]): { ready: UnitRow[]; failed: MatchView["notReady"] } {
  const failed: MatchView["notReady"] = [];
  const ready: UnitRow[] = [];
  for (const r of rows) {
    if (r.setCode || r.caseCode) continue;
    if (r.state === "failed") {
      failed.push({ identity: r.identity, reason: "failed on the bench" });
      continue;
    }
    if (r.state !== "measured" && r.state !== "in_stock") continue;
    ready.push(r);
  }
  return { ready, failed };
}

function matchViewOf<U extends PlanUnit>(
  partType: PartType,
  failed: MatchView["notReady"],
  read: { units: U[]; notReady: MatchView["notReady"] },
  quarantined: Quarantined[],
  opts: { limitDb: number; fsWeight?: number; qtsWeight?: number },
): Omit<MatchView, "units"> & { units: U[] } {
  const bands = bandsOf(partType);
  const plan = planPairs(read.units, { ...opts, bandLabels: bands.map((b) => bandLabel(b.nominal)) });
  return { bands, units: read.units, notReady: [...failed, ...read.notReady], quarantined, plan, limitDb: opts.limitDb };
}

export interface MatchReadiness {
  /** Measured units free to pair. */
  free: number;
  /** Measured units left out because an open containment quarantines them. */
  quarantined: number;
  /** Whether matching can pair anything, under the loosest limit of a model that takes the part type. */
  canMatch: boolean;
  /** Why not, in the lab's words, when it cannot and there is something to say. */
  why: string | null;
}

/**
 * Whether matching a batch can make a pair, so that it is offered only when it can: worked out
 * under the loosest limit of any active model that takes the part type (if no pair is allowed
 * there, none is under a tighter one).
 */
export async function matchReadiness(db: DbOrTx, batch: { id: string; partType: PartType }): Promise<MatchReadiness> {
  return (await matchReadinessOf(db, [batch])).get(batch.id)!;
}

/**
 * `matchReadiness` of many batches at once (the lab's home lists every batch with free units):
 * their units, responses, holds and the models' limits are read in a few queries for all of them,
 * not a few queries a batch.
 */
export async function matchReadinessOf(db: DbOrTx, batches: readonly { id: string; partType: PartType }[]): Promise<Map<string, MatchReadiness>> {
  const out = new Map<string, MatchReadiness>();
  if (!batches.length) return out;
  const ready = new Map<string, ReadyUnit[]>(batches.map((b) => [b.id, []]));
  for (const u of await readyUnitsOf(db, batches.map((b) => b.id))) ready.get(u.batchId)!.push(u);
  const { quarantined } = await withoutQuarantined(db, [...ready.values()].flat());
  const held = new Set(quarantined.map((q) => q.itemId));
  const limitsOf = new Map<PartType, Awaited<ReturnType<typeof modelsTakingPartType>>>();
  for (const partType of new Set(batches.map((b) => b.partType))) limitsOf.set(partType, await modelsTakingPartType(db, partType));
  // Band levels are kept with each response when it is recorded; points are read only where they were not.
  const levelsOf = (u: ReadyUnit, partType: PartType) => (u.bands && u.bands.minHz === PASSBANDS[partType].minHz && u.bands.maxHz === PASSBANDS[partType].maxHz ? u.bands.levels : null);
  const unbanded = batches.flatMap((b) => ready.get(b.id)!.filter((u) => u.responseId !== null && !levelsOf(u, b.partType)));
  const pointsOf = await pointsOfResponses(db, unbanded.map((u) => u.responseId!));

  for (const batch of batches) {
    const candidates = ready.get(batch.id)!;
    const limits = [...limitsOf.get(batch.partType)!];
    const loosest = limits.sort((a, b) => b.limit - a.limit)[0];
    if (!loosest) {
      const free = candidates.filter((u) => u.responseId !== null).length;
      out.set(batch.id, { free, quarantined: 0, canMatch: false, why: free >= 2 ? `No model in production has a mismatch limit for ${partWord(batch.partType)}s, so there is nothing to match them against.` : null });
      continue;
    }
    const ids = new Set(candidates.map((u) => u.id));
    const mine = quarantined.filter((q) => ids.has(q.itemId));
    const read = plannedUnitsOf(candidates.filter((u) => !held.has(u.id)), (u) => levelsOf(u, batch.partType), pointsOf, batch.partType);
    // Whether one pair is allowed is all the answer needs; the plan itself only says why not.
    if (hasAllowedPair(read.units, { limitDb: loosest.limit })) {
      out.set(batch.id, { free: read.units.length, quarantined: mine.length, canMatch: true, why: null });
      continue;
    }
    const view = matchViewOf(batch.partType, [], read, mine, { limitDb: loosest.limit });
    const count = view.units.length;
    const why = count >= 2 ? whyNoPairs(view.plan, { free: count, limitDb: loosest.limit, noun: "units", bandLabels: view.bands.map((b) => bandLabel(b.nominal)) }) : null;
    const several = new Set(limits.map((l) => l.limit)).size > 1;
    out.set(batch.id, { free: count, quarantined: view.quarantined.length, canMatch: false, why: why && several ? `${why} That is the loosest limit of any model, the ${loosest.code}'s.` : why });
  }
  return out;
}

/** A unit matching could take now (measured or back in stock, in no set or case), as readiness reads it. */
interface ReadyUnit {
  batchId: string;
  id: string;
  identity: string;
  responseId: number | null;
  /** The band levels kept with its newest response, and over which passband. */
  bands: { minHz: number; maxHz: number; levels: number[] } | null;
  fsHz: number | null;
  qts: number | null;
}

/**
 * The units of these batches that matching could take, each with its newest response's kept band
 * levels and its newest Fs and Qts. One query, answered as one JSON value: a row per unit through
 * the driver costs more than the query itself.
 */
async function readyUnitsOf(db: DbOrTx, batchIds: string[]): Promise<ReadyUnit[]> {
  const [row] = await db.all<{ j: string | null }>(sql`
    SELECT json_group_array(json_array(u.batch_id, u.id, u.identity, u.response_id, u.min_hz, u.max_hz, json(u.levels), u.fs_hz, u.qts)) AS j
    FROM (
      SELECT bu.batch_id, i.id, i.identity, r.id AS response_id, b.min_hz, b.max_hz, b.levels, t.fs_hz, t.qts
      FROM batch_units bu
      JOIN items i ON i.id = bu.item_id
      LEFT JOIN responses r ON r.id = (SELECT max(r2.id) FROM responses r2 WHERE r2.item_id = i.id AND r2.purpose = 'unit')
      LEFT JOIN response_bands b ON b.response_id = r.id
      LEFT JOIN ts_params t ON t.id = (SELECT max(t2.id) FROM ts_params t2 WHERE t2.item_id = i.id)
      WHERE bu.batch_id IN (SELECT value FROM json_each(${JSON.stringify(batchIds)}))
        AND i.state IN ('measured', 'in_stock')
        AND NOT EXISTS (SELECT 1 FROM set_members sm WHERE sm.item_id = i.id AND sm.ended_at IS NULL)
        AND NOT EXISTS (SELECT 1 FROM case_reservations cr WHERE cr.item_id = i.id AND cr.ended_at IS NULL)
    ) u`);
  type Tuple = [string, string, string, number | null, number | null, number | null, number[] | null, number | null, number | null];
  const units = (JSON.parse(row?.j ?? "[]") as Tuple[]).map(([batchId, id, identity, responseId, minHz, maxHz, levels, fsHz, qts]) => ({
    batchId, id, identity, responseId, fsHz, qts,
    bands: levels && minHz !== null && maxHz !== null ? { minHz, maxHz, levels } : null,
  }));
  // By serial, as the batch's table lists them, so plans and reasons name units in the same order (code-unit order, as SQLite's).
  return units.sort((a, b) => (a.identity < b.identity ? -1 : a.identity > b.identity ? 1 : 0));
}

/**
 * Units as planning takes them, from the band levels kept with their newest responses; a unit
 * whose levels were not kept is banded from its points by `matchUnitsOf`, which also says why one
 * with no response, or one that misses the bands, is not ready.
 */
function plannedUnitsOf(rows: ReadyUnit[], levelsOf: (u: ReadyUnit) => number[] | null, pointsOf: Map<number, number[][]>, partType: PartType): { units: PlanUnit[]; notReady: MatchView["notReady"] } {
  const units: PlanUnit[] = [];
  const rest: Parameters<typeof matchUnitsOf>[0] = [];
  for (const r of rows) {
    const levels = levelsOf(r);
    if (levels) units.push({ id: r.identity, itemId: r.id, identity: r.identity, levels, ...(r.fsHz !== null ? { fs: r.fsHz } : {}), ...(r.qts !== null ? { qts: r.qts } : {}) });
    else rest.push({ ...r, points: r.responseId === null ? null : (pointsOf.get(r.responseId) ?? null) });
  }
  const banded = matchUnitsOf(rest, bandsOf(partType));
  // In the rows' order, as matchUnitsOf alone would give them, so plans and reasons come out the same.
  const order = new Map(rows.map((r, i) => [r.identity, i]));
  return { units: [...units, ...banded.units].sort((a, b) => order.get(a.identity)! - order.get(b.identity)!), notReady: banded.notReady };
}

/** Thrown when units of a plan were reserved by someone else first. */
export class UnitsTakenError extends AppError {
  constructor(public readonly taken: string[]) {
    super(409, `${taken.join(", ")} ${taken.length === 1 ? "was" : "were"} reserved a moment ago by another plan. Nothing was saved; the plan below is worked out again from the units still free.`);
    this.name = "UnitsTakenError";
  }
}

/**
 * Accepts a plan: each pair becomes a matched set whose two units are reserved for one future
 * speaker pair (left and right). Costs are worked out again here from the measurements, so a
 * pair the limit does not allow cannot be reserved whatever the browser sends.
 */
export async function acceptPlan(
  db: DbOrTx,
  input: { batchId: string; modelId: string; pairs: { a: string; b: string }[]; fsWeight?: number; qtsWeight?: number },
  actor: LabActor,
) {
  const [batch] = await db.select().from(unitBatches).where(eq(unitBatches.id, input.batchId)).limit(1);
  if (!batch) throw new AppError(404, "That batch is not in the register.");
  const limit = await limitFor(db, input.modelId, batch.partType);
  if (!limit) throw new AppError(400, "Choose a model that uses this part type.");
  if (!input.pairs.length) throw new AppError(400, "The plan has no pair to accept.");
  /** Serials of the units in the plan. */
  const ids = input.pairs.flatMap((p) => [p.a, p.b]);
  if (new Set(ids).size !== ids.length) throw new AppError(400, "A unit appears in two pairs of the plan.");
  try {
    return await db.transaction(async (tx) => {
      const view = await matchBatch(tx, { id: batch.id, partType: batch.partType }, { limitDb: limit.limit, fsWeight: input.fsWeight, qtsWeight: input.qtsWeight });
      const byId = new Map(view.units.map((u) => [u.id, u]));
      await refuseQuarantinedIn(tx, view.quarantined, ids);

      const taken = ids.filter((id) => !byId.has(id));
      if (taken.length) throw new UnitsTakenError(taken);
      const out: { code: string; left: string; right: string }[] = [];
      const [count] = await tx.select({ n: sql<number>`count(*)` }).from(matchedSets).where(like(matchedSets.code, `M-${batch.code}-%`));
      let n = Number(count?.n ?? 0);
      for (const p of input.pairs) {
        const a = byId.get(p.a)!;
        const b = byId.get(p.b)!;
        const c = pairCost(a, b, { limitDb: limit.limit, fsWeight: input.fsWeight, qtsWeight: input.qtsWeight });
        if (c.maxDiffDb > limit.limit + LIMIT_EPSILON_DB) {
          throw new AppError(400, `${a.identity} and ${b.identity} differ by ${formatDb(c.maxDiffDb)} at ${bandLabel(view.bands[c.worstBand]?.nominal ?? "?")}, over the ${formatLimitDb(limit.limit)} limit. Nothing was saved.`);
        }
        const id = newId();
        const code = `M-${batch.code}-${String(++n).padStart(3, "0")}`;
        const eventId = await appendEvent(tx, {
          actorId: actor.id,
          station: LAB_STATION,
          type: "set.matched",
          subjectKind: "set",
          subjectId: id,
          data: { code, left: a.identity, right: b.identity, cost: c.cost, maxDiffDb: c.maxDiffDb, limitDb: limit.limit, model: limit.model.code, ...machineData(actor) },
        });
        await tx.insert(matchedSets).values({ id, code, kind: "drive_unit", partType: batch.partType, batchId: batch.id, modelId: input.modelId, cost: c.cost, maxDiffDb: c.maxDiffDb, limitDb: limit.limit, eventId, createdAt: now() });
        await tx.insert(setMembers).values([
          { setId: id, itemId: a.itemId, side: "L" },
          { setId: id, itemId: b.itemId, side: "R" },
        ]);
        for (const u of [a, b]) {
          const [item] = await tx.select().from(items).where(eq(items.id, u.itemId)).limit(1);
          await changeState(tx, item!, "reserved", recorder(actor), { set: code });
        }
        out.push({ code, left: a.identity, right: b.identity });
      }
      return out;
    });
  } catch (e) {
    if (e instanceof AppError) throw e;
    if (isConstraintError(e, "UNIQUE")) {
      const held = await db.select({ identity: items.identity }).from(setMembers).innerJoin(items, eq(items.id, setMembers.itemId)).where(and(inArray(items.identity, ids), isNull(setMembers.endedAt)));
      // A service case may have taken one meanwhile (migration 0033 refuses the set then).
      const forCases = await db.select({ identity: items.identity }).from(caseReservations).innerJoin(items, eq(items.id, caseReservations.itemId)).where(and(inArray(items.identity, ids), isNull(caseReservations.endedAt)));
      throw new UnitsTakenError([...held, ...forCases].map((h) => h.identity));
    }
    throw e;
  }
}

/** Sets reserved and not yet fitted, newest first, with their two units. */
export async function openSets(db: DbOrTx, limit = 200) {
  const rows = await db
    .select({ set: matchedSets, side: setMembers.side, unit: items.identity, model: models.code })
    .from(matchedSets)
    .innerJoin(setMembers, eq(setMembers.setId, matchedSets.id))
    .innerJoin(items, eq(items.id, setMembers.itemId))
    .leftJoin(models, eq(models.id, matchedSets.modelId))
    .where(isNull(setMembers.endedAt))
    .orderBy(desc(matchedSets.createdAt))
    .limit(limit * 2);
  const sets = new Map<string, { code: string; partType: string | null; model: string | null; cost: number; maxDiffDb: number; limitDb: number; createdAt: Date; L?: string; R?: string }>();
  for (const r of rows) {
    const s = sets.get(r.set.id) ?? { code: r.set.code, partType: r.set.partType, model: r.model, cost: r.set.cost, maxDiffDb: r.set.maxDiffDb, limitDb: r.set.limitDb, createdAt: r.set.createdAt };
    s[r.side] = r.unit;
    sets.set(r.set.id, s);
  }
  return [...sets.values()];
}

/**
 * Batches, newest first, with their units counted by where they stand (lib/lab/unit-counts: waiting,
 * measured and free, reserved, fitted, failed, other), so the counts add up to the batch's units.
 */
export async function listBatches(db: DbOrTx): Promise<(typeof unitBatches.$inferSelect & UnitCounts)[]> {
  const [batches, groups] = await Promise.all([
    db.select().from(unitBatches).orderBy(desc(unitBatches.receivedOn), desc(unitBatches.code)),
    db.all<{ batchId: string; state: string; inOpenSet: number; n: number }>(sql`
      SELECT bu.batch_id AS batchId, i.state AS state,
        (EXISTS (SELECT 1 FROM set_members sm WHERE sm.item_id = i.id AND sm.ended_at IS NULL)
          OR EXISTS (SELECT 1 FROM case_reservations cr WHERE cr.item_id = i.id AND cr.ended_at IS NULL)) AS inOpenSet,
        count(*) AS n
      FROM batch_units bu JOIN items i ON i.id = bu.item_id
      GROUP BY bu.batch_id, i.state, inOpenSet`),
  ]);
  const byBatch = new Map<string, { state: string; inOpenSet: boolean; n: number }[]>();
  for (const g of groups) {
    const list = byBatch.get(g.batchId) ?? [];
    list.push({ state: g.state, inOpenSet: Boolean(g.inOpenSet), n: Number(g.n) });
    byBatch.set(g.batchId, list);
  }
  return batches.map((b) => ({ ...b, ...countUnits(byBatch.get(b.id) ?? []) }));
}
