import "server-only";
import { refuseQuarantinedIn, withoutQuarantined, type Quarantined } from "./quarantine";
import { and, asc, desc, eq, inArray, isNull, like, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { caseReservations, crossoverParts, events, items, matchedSets, modelTolerances, models, responses, setMembers, type Item, type Model } from "@/db/schema";
import { AppError, isConstraintError } from "@/lib/auth/errors";
import { now } from "@/lib/clock";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";
import { changeState, createItem, fit, itemByIdentity, type Recorder } from "@/lib/genealogy/graph";
import { bandLabel, bandLevels, formatDb, formatLimitDb, parseResponseFile, thirdOctaveBands, type ResponseFilePoint } from "@/lib/acoustics";
import { boardVerdict, checkNominal, formatValue, parseNominal, parseValue, readPartValues, TOLERANCE_LETTERS, type BoardVerdict, type Unit } from "@/lib/crossover-parts";
import { pairCost, planPairs } from "@/lib/matching";
import { allocateSerial } from "@/lib/serials/allocator";
import type { LabActor } from "@/lib/vocabulary/actor";
import { LAB_STATION, UnitsTakenError } from "./units";

/**
 * Crossover boards: built from component lots at the bench, checked part by part against IEC 60063
 * preferred values and IEC 60062 tolerance letters (see docs/REFERENCES.md, § Crossover networks;
 * the checks themselves live in lib/crossover-parts), and paired left/right on their
 * measured responses the way lib/lab/units.ts pairs drive units.
 */

const recorder = (actor: LabActor, reason?: string | null): Recorder => ({ actorId: actor.id, station: actor.machine ? "lab-bench" : LAB_STATION, reason: reason ?? null });
const machineData = (actor: LabActor) => (actor.machine ? { machineTokenId: actor.machine.id, machineTokenName: actor.machine.name } : {});

/** Parts a board may list: enough for a three-way network with its padding, few enough to catch a runaway paste. */
export const MAX_BOARD_PARTS = 40;

/** A reference designator: C, L or R and a number, as printed on the board. The letter says the quantity. */
const POSITION = /^([CLR])([1-9]\d{0,2})$/;
const UNIT_OF_LETTER: Record<string, Unit> = { C: "F", L: "H", R: "Ω" };
const PART_TYPE_OF_UNIT: Record<Unit, string> = { F: "capacitor", H: "inductor", Ω: "resistor" };
/** Lot codes as suppliers print them and the demo uses (LOT-CAP-2502-A): capitals, digits and . - / _ */
const LOT_CODE = /^[A-Z0-9][A-Z0-9._/-]{2,39}$/;

export interface BoardPartInput {
  position: string;
  /** The lot's code as on its bag or reel, e.g. LOT-CAP-2502-A. */
  lot: string;
  partNumber: string;
  /** As typed: "4.7µF", "4u7", "0.82 mH", "8R2"; the unit may be left out, the position's letter says it. */
  nominal: string;
  /** IEC 60062 letter: B C D F G J K M. */
  tolerance: string;
  /** As typed, in the same unit; "" when not measured (the board then fails: every part is measured). */
  reading: string;
}

export interface BuildInput {
  modelId: string;
  parts: BoardPartInput[];
  response?: { name: string; text: string } | null;
}

interface CheckedPart {
  position: string;
  lot: string;
  partNumber: string;
  nominal: number;
  unit: Unit;
  tolerance: string;
  reading: number | null;
  /** The lot as registered, or null when this build registers it. */
  existing: Item | null;
}

/** The nominal value a lot says it holds: ours ({ nominal, unit }) or the demo's free text ("4.7 µF 400 V …"). */
function lotNominal(lot: Item): { value: number; unit: Unit } | null {
  const a = lot.attrs ?? {};
  if (typeof a.nominal === "number" && (a.unit === "F" || a.unit === "H" || a.unit === "Ω")) return { value: a.nominal, unit: a.unit };
  if (typeof a.value === "string") {
    const m = /^\s*(\d+(?:[.,]\d+)?\s*[pnuµmkM]?\s*(?:F|H|Ω|ohms?))(?:\s|,|$)/i.exec(a.value);
    const parsed = m ? parseValue(m[1]!) : null;
    if (parsed?.ok) return { value: parsed.value, unit: parsed.unit };
  }
  return null;
}

const same = (a: number, b: number) => Math.abs(a / b - 1) <= 0.005;
const rowKey = (i: number) => `parts.${i}`;
const plural = (n: number, one: string, many: string) => `${n} ${n === 1 ? one : many}`;

/**
 * Checks a board's input without writing anything. Each row's problems are under `parts.<index>`
 * (0-based, in the order given), a summary naming rows under `parts`, the model under `modelId`
 * and the response file's problems, with their line numbers, under `response`.
 */
async function checkBuild(db: DbOrTx, input: BuildInput) {
  const errors: Record<string, string[]> = {};
  const add = (key: string, message: string) => (errors[key] ??= []).push(message);

  const [model] = input.modelId ? await db.select().from(models).where(eq(models.id, input.modelId)).limit(1) : [];
  if (!model) add("modelId", "Choose the model the board is for.");
  else if (!model.active) add("modelId", `${model.code} ${model.name} is no longer built; choose a current model.`);

  const rows = Array.isArray(input.parts) ? input.parts : [];
  if (rows.length === 0) add("parts", "Add at least one part.");
  if (rows.length > MAX_BOARD_PARTS) add("parts", `A board lists at most ${MAX_BOARD_PARTS} parts; this one has ${rows.length}.`);

  const firstRowOf = new Map<string, number>();
  const lotCache = new Map<string, Item | null>();
  const checked: CheckedPart[] = [];
  for (const [i, raw] of rows.slice(0, MAX_BOARD_PARTS).entries()) {
    const problems: string[] = [];
    const position = String(raw.position ?? "").trim().toUpperCase();
    const lot = String(raw.lot ?? "").trim().toUpperCase();
    const partNumber = String(raw.partNumber ?? "").trim();
    const tolerance = String(raw.tolerance ?? "").trim().toUpperCase();
    const m = POSITION.exec(position);
    // A row the form started with and nobody filled: one message, not one per field. It is never
    // left out silently, or a board missing a part could pass.
    if (![raw.lot, raw.partNumber, raw.nominal, raw.reading].some((v) => String(v ?? "").trim())) {
      const message = "This row is empty: fill it in, or remove it if the board has no such part.";
      errors[rowKey(i)] = [message];
      add("parts", `Row ${i + 1}${m ? ` (${position})` : ""}: ${message}`);
      if (m && !firstRowOf.has(position)) firstRowOf.set(position, i);
      continue;
    }
    if (!position) problems.push("Give the position, as printed on the board: C1, L2, R3.");
    else if (!m) problems.push(`"${raw.position}" is not a position; write C, L or R and a number, as printed on the board: C1, L2, R3.`);
    else if (firstRowOf.has(position)) problems.push(`${position} is listed already, in row ${firstRowOf.get(position)! + 1}; each position appears once on a board.`);
    else firstRowOf.set(position, i);
    const unit = m ? UNIT_OF_LETTER[m[1]!]! : undefined;

    if (!partNumber) problems.push("Give the part number.");
    else if (partNumber.length > 60) problems.push("A part number has at most 60 characters.");

    // One reading of the row for the form's preview and for the record (lib/crossover-parts).
    const read = readPartValues({ nominal: String(raw.nominal ?? ""), reading: String(raw.reading ?? ""), unit });
    let nominal: number | null = null;
    let parsedUnit: Unit | undefined = unit;
    const n = read.nominal ?? parseNominal("", unit);
    if (!n.ok) problems.push(`Nominal: ${n.message}`);
    else {
      parsedUnit = n.unit;
      // IEC 60063: a nominal off the E24 series is a typing error, not a part anyone sells.
      const onSeries = checkNominal(n.value, n.unit, "E24");
      if (!onSeries.ok) problems.push(`Nominal: ${onSeries.message} Check the value printed on the part.`);
      else nominal = n.value;
    }

    // IEC 60062 tolerance letters.
    if (!tolerance) problems.push("Choose the tolerance letter.");
    else if (!Object.hasOwn(TOLERANCE_LETTERS, tolerance)) {
      const known = Object.entries(TOLERANCE_LETTERS).map(([l, f]) => `${l} (±${Number((f * 100).toPrecision(6))} %)`).join(", ");
      problems.push(`"${raw.tolerance}" is not an IEC 60062 tolerance letter; use one of ${known}.`);
    }

    // A reading ten times away from the nominal is a slip, refused here before anything is recorded.
    let reading: number | null = null;
    if (read.reading) {
      if (!read.reading.ok) problems.push(`Reading: ${read.reading.message}`);
      else reading = read.reading.value;
    }

    let existing: Item | null = null;
    if (!lot) problems.push("Give the lot code from the part's bag or reel.");
    else if (!LOT_CODE.test(lot)) problems.push(`"${raw.lot}" is not a lot code: 3 to 40 capitals, digits and . - / _, such as LOT-CAP-2502-A.`);
    else {
      if (!lotCache.has(lot)) lotCache.set(lot, await itemByIdentity(db, lot));
      existing = lotCache.get(lot) ?? null;
      if (existing && existing.kind !== "component_lot") {
        problems.push(`${lot} is registered as a ${existing.kind.replace(/_/g, " ")}, not a component lot.`);
      } else if (existing && existing.state !== "in_stock") {
        problems.push(`${lot} is recorded as ${existing.state.replace(/_/g, " ")}: a board cannot take parts from it.`);
      } else if (existing && parsedUnit) {
        const held = lotNominal(existing);
        const kind = existing.partType;
        if (held && held.unit !== parsedUnit) problems.push(`${lot} holds ${formatValue(held.value, held.unit)} ${PART_TYPE_OF_UNIT[held.unit]}s, but ${position || "this position"} takes a ${PART_TYPE_OF_UNIT[parsedUnit]}: check the lot label.`);
        else if (!held && kind && Object.values(PART_TYPE_OF_UNIT).includes(kind) && kind !== PART_TYPE_OF_UNIT[parsedUnit]) problems.push(`${lot} is a lot of ${kind}s; ${position || "this position"} takes a ${PART_TYPE_OF_UNIT[parsedUnit]}.`);
        else if (held && nominal !== null && !same(held.value, nominal)) problems.push(`${lot} holds ${formatValue(held.value, held.unit)} parts, not ${formatValue(nominal, held.unit)}: check the lot label or the nominal.`);
      }
    }

    if (problems.length) {
      errors[rowKey(i)] = problems;
      for (const p of problems) add("parts", `Row ${i + 1}${m ? ` (${position})` : ""}: ${p}`);
    } else {
      checked.push({ position, lot, partNumber, nominal: nominal!, unit: parsedUnit!, tolerance, reading, existing });
    }
  }

  let points: ResponseFilePoint[] | null = null;
  if (input.response && input.response.text.trim()) {
    const parsed = parseResponseFile(input.response.text, { name: input.response.name });
    if (!parsed.ok) for (const e of parsed.errors.slice(0, 10)) add("response", `${input.response.name || "The response file"}, line ${e.line}: ${e.message}`);
    else points = parsed.points;
  }

  const rowProblems = Object.keys(errors).filter((k) => k.startsWith("parts.")).length;
  if (Object.keys(errors).length) {
    const what = [rowProblems ? plural(rowProblems, "row needs", "rows need") + " attention" : "", errors.response ? "the response file has problems" : "", errors.modelId ? "the model is missing" : ""].filter(Boolean);
    const first = errors.parts?.[0] ?? errors.response?.[0] ?? errors.modelId?.[0] ?? "";
    throw new AppError(400, `Nothing was saved: ${what.join("; ") || "check the parts"}. ${first}`.trim(), errors);
  }
  return { model: model!, parts: checked, points, responseName: input.response?.name || null };
}

/**
 * Builds a crossover board. Everything is checked first (the model; 1–40 parts with unique
 * positions like C1, L2, R3; each nominal read with lib/crossover-parts `readPartValues` and on
 * the E24 series (IEC 60063), so "4.8µF" is refused as a typing error; a known IEC 60062 tolerance
 * letter; the reading in the same unit, a bare number in the nominal's unit, and refused as a
 * slip when more than ten times away from the nominal; the response file); any problem refuses the whole board
 * and nothing is written. Then, in one transaction: the board with its serial, each lot fitted
 * at its position (a lot not yet registered is registered first), a `crossover_parts` row per
 * part, the response if given, the event "crossover.built" and the verdict as a state change:
 * "in_stock" when the board passes, "failed" (with its reasons) when it does not. A failing
 * board is recorded all the same: it exists, and its reasons explain where it went.
 */
export async function buildCrossover(db: DbOrTx, input: BuildInput, actor: LabActor): Promise<{ crossover: Item; verdict: BoardVerdict }> {
  const { model, parts, points, responseName } = await checkBuild(db, input);
  const verdict = boardVerdict(
    parts.map((p) => ({ position: p.position, partNumber: p.partNumber, nominal: p.nominal, unit: p.unit, tolerance: p.tolerance, reading: p.reading })),
    { series: "E24" },
  );
  const crossover = await db.transaction(async (tx) => {
    const board = await createItem(
      tx,
      {
        kind: "crossover",
        identity: await allocateSerial(tx, { kind: "crossover", code: model.code, year: now().getUTCFullYear() }),
        modelId: model.id,
        // Built, then judged below: the state change carries the verdict and, for a failure, its reasons.
        state: "built",
        attrs: { parts: parts.length },
      },
      recorder(actor),
    );
    const lots = new Map<string, Item>();
    for (const p of parts) {
      let lot = lots.get(p.lot) ?? (await itemByIdentity(tx, p.lot));
      if (lot && (lot.kind !== "component_lot" || lot.state !== "in_stock")) {
        throw new AppError(409, `${p.lot} changed a moment ago (now ${lot.kind === "component_lot" ? lot.state.replace(/_/g, " ") : `a ${lot.kind.replace(/_/g, " ")}`}). Nothing was saved; check the lot and try again.`);
      }
      if (!lot) {
        lot = await createItem(
          tx,
          {
            kind: "component_lot",
            identity: p.lot,
            partType: PART_TYPE_OF_UNIT[p.unit],
            state: "in_stock",
            attrs: { partNumber: p.partNumber, nominal: p.nominal, unit: p.unit, tolerance: p.tolerance },
          },
          recorder(actor),
        );
      }
      lots.set(p.lot, lot);
      await fit(tx, { parent: board, child: lot, position: p.position, data: machineData(actor) }, recorder(actor));
    }
    const eventId = await appendEvent(tx, {
      actorId: actor.id,
      station: recorder(actor).station,
      type: "crossover.built",
      subjectKind: "item",
      subjectId: board.id,
      data: { identity: board.identity, model: model.code, pass: verdict.pass, reasons: verdict.reasons, parts: parts.length, response: points !== null, ...machineData(actor) },
    });
    await tx.insert(crossoverParts).values(
      parts.map((p) => ({ crossoverId: board.id, position: p.position, lotId: lots.get(p.lot)!.id, partNumber: p.partNumber, nominal: p.nominal, unit: p.unit, tolerance: p.tolerance, reading: p.reading, eventId })),
    );
    if (points) {
      const responseEvent = await appendEvent(tx, {
        actorId: actor.id,
        station: recorder(actor).station,
        type: "unit.response_measured",
        subjectKind: "item",
        subjectId: board.id,
        data: { identity: board.identity, points: points.length, fromHz: points[0]?.hz, toHz: points.at(-1)?.hz, fileName: responseName, source: "form", ...machineData(actor) },
      });
      await tx.insert(responses).values({
        itemId: board.id,
        purpose: "unit",
        points: points.map((p) => (p.phaseDeg === undefined ? [p.hz, p.db] : [p.hz, p.db, p.phaseDeg])),
        fileName: responseName,
        source: "form",
        eventId: responseEvent,
        createdAt: now(),
      });
    }
    await changeState(tx, board, verdict.pass ? "in_stock" : "failed", recorder(actor, verdict.pass ? null : verdict.reasons.join("; ")), { pass: verdict.pass, ...machineData(actor) });
    return board;
  });
  return { crossover, verdict };
}

// ---- reading boards -----------------------------------------------------------------------------

export interface BoardRow {
  id: string;
  identity: string;
  model: string | null;
  state: string;
  createdAt: Date;
  parts: number;
  /** From the "crossover.built" event; null for a board built before the lab recorded its checks. */
  pass: boolean | null;
  reasons: string[];
  hasResponse: boolean;
  setCode: string | null;
}

/** Boards newest first, with their model, state, part count, verdict, whether measured, and open set. */
export async function crossoverBoards(db: DbOrTx, opts: { modelId?: string | null; limit: number }): Promise<BoardRow[]> {
  const limit = Math.max(1, Math.min(500, Math.floor(opts.limit)));
  const rows = await db
    .select({ id: items.id, identity: items.identity, state: items.state, createdAt: items.createdAt, model: models.code })
    .from(items)
    .leftJoin(models, eq(models.id, items.modelId))
    .where(and(eq(items.kind, "crossover"), opts.modelId ? eq(items.modelId, opts.modelId) : undefined))
    .orderBy(desc(items.createdAt), desc(items.identity))
    .limit(limit);
  const ids = rows.map((r) => r.id);
  if (!ids.length) return [];
  const [counts, built, measured, sets] = await Promise.all([
    db.select({ id: crossoverParts.crossoverId, n: sql<number>`count(*)` }).from(crossoverParts).where(inArray(crossoverParts.crossoverId, ids)).groupBy(crossoverParts.crossoverId),
    db
      .select({ id: events.subjectId, data: events.data })
      .from(events)
      .where(and(eq(events.type, "crossover.built"), eq(events.subjectKind, "item"), inArray(events.subjectId, ids)))
      .orderBy(asc(events.id)),
    db.selectDistinct({ id: responses.itemId }).from(responses).where(and(inArray(responses.itemId, ids), eq(responses.purpose, "unit"))),
    db
      .select({ id: setMembers.itemId, code: matchedSets.code })
      .from(setMembers)
      .innerJoin(matchedSets, eq(matchedSets.id, setMembers.setId))
      .where(and(inArray(setMembers.itemId, ids), isNull(setMembers.endedAt))),
  ]);
  const count = new Map(counts.map((c) => [c.id, Number(c.n)]));
  const verdicts = new Map(built.map((b) => [b.id, b.data as { pass?: unknown; reasons?: unknown }]));
  const withResponse = new Set(measured.map((m) => m.id));
  const setOf = new Map(sets.map((s) => [s.id, s.code]));
  return rows.map((r) => {
    const v = verdicts.get(r.id);
    return {
      ...r,
      parts: count.get(r.id) ?? 0,
      pass: typeof v?.pass === "boolean" ? v.pass : null,
      reasons: Array.isArray(v?.reasons) ? v.reasons.filter((x): x is string => typeof x === "string") : [],
      hasResponse: withResponse.has(r.id),
      setCode: setOf.get(r.id) ?? null,
    };
  });
}

/** One board's parts as built, by position. */
export async function boardParts(db: DbOrTx, crossoverId: string) {
  return db
    .select({ position: crossoverParts.position, lot: items.identity, partNumber: crossoverParts.partNumber, nominal: crossoverParts.nominal, unit: crossoverParts.unit, tolerance: crossoverParts.tolerance, reading: crossoverParts.reading })
    .from(crossoverParts)
    .innerJoin(items, eq(items.id, crossoverParts.lotId))
    .where(eq(crossoverParts.crossoverId, crossoverId))
    .orderBy(asc(crossoverParts.position));
}

/** Active models with what the crossover pages need: the response range and the default pairing limit. */
export async function crossoverModels(db: DbOrTx) {
  const rows = await db
    .select({ model: models, limit: sql<number | null>`min(${modelTolerances.mismatchLimitDb})` })
    .from(models)
    .leftJoin(modelTolerances, eq(modelTolerances.modelId, models.id))
    .where(eq(models.active, true))
    .groupBy(models.id)
    .orderBy(asc(models.code));
  // The tightest drive-unit limit of the model, never looser than its finished-pair limit.
  return rows.map((r) => ({ ...r.model, defaultLimitDb: Math.min(r.limit === null ? 0.5 : Number(r.limit), r.model.pairResponseLimitDb) }));
}

/** Component lots in stock, newest first, for the lot field's suggestions. */
export async function lotsInStock(db: DbOrTx, limit = 300) {
  const rows = await db
    .select({ identity: items.identity, partType: items.partType, attrs: items.attrs })
    .from(items)
    .where(and(eq(items.kind, "component_lot"), eq(items.state, "in_stock")))
    .orderBy(desc(items.createdAt))
    .limit(limit);
  return rows.map((r) => {
    const a = r.attrs ?? {};
    const text = (k: string) => (typeof a[k] === "string" ? (a[k] as string) : "");
    const held = typeof a.nominal === "number" && (a.unit === "F" || a.unit === "H" || a.unit === "Ω") ? formatValue(a.nominal, a.unit) : "";
    return { identity: r.identity, partType: r.partType, partNumber: text("partNumber"), nominal: held, tolerance: text("tolerance"), value: text("value") || held };
  });
}

// ---- pairing ------------------------------------------------------------------------------------

export interface CrossoverMatchView {
  model: Model;
  bands: ReturnType<typeof thirdOctaveBands>;
  /** `id` is the board's serial, so the plan and its reasons name boards as people know them. */
  units: { id: string; itemId: string; identity: string; levels: number[]; points: number[][] }[];
  notReady: { identity: string; reason: string }[];
  /** Boards that would be free but an open containment quarantines: left out of the plan. */
  quarantined: Quarantined[];
  plan: ReturnType<typeof planPairs>;
  limitDb: number;
}

async function modelById(db: DbOrTx, modelId: string) {
  const [model] = await db.select().from(models).where(eq(models.id, modelId)).limit(1);
  if (!model) throw new AppError(404, "That model is not in the register.");
  return model;
}

function checkLimit(model: Model, limitDb: number) {
  if (typeof limitDb !== "number" || !Number.isFinite(limitDb) || limitDb <= 0) throw new AppError(400, "The limit is a number of dB greater than 0.", { limitDb: ["A number of dB greater than 0."] });
  // Boards further apart than the finished pair may differ would only make a pair that fails its final test.
  if (limitDb > model.pairResponseLimitDb + 1e-9) {
    throw new AppError(400, `The limit cannot be looser than ${model.code}'s finished-pair limit of ${formatLimitDb(model.pairResponseLimitDb)}.`, { limitDb: [`At most ${formatLimitDb(model.pairResponseLimitDb)} for ${model.code}.`] });
  }
}

/** A model's boards free to pair: passed their check and in stock, in no open matched set, held by no service case and by no open containment. */
export async function freeBoards(db: DbOrTx, modelId: string): Promise<{ id: string; identity: string }[]> {
  return (await withoutQuarantined(db, await boardsInStock(db, modelId))).free;
}

/** A model's boards in stock, in no open matched set and held by no service case (quarantined or not). */
function boardsInStock(db: DbOrTx, modelId: string) {
  return db
    .select({ id: items.id, identity: items.identity })
    .from(items)
    .where(
      and(
        eq(items.kind, "crossover"),
        eq(items.modelId, modelId),
        eq(items.state, "in_stock"),
        sql`NOT EXISTS (SELECT 1 FROM ${setMembers} sm WHERE sm.item_id = ${items.id} AND sm.ended_at IS NULL)`,
        sql`NOT EXISTS (SELECT 1 FROM ${caseReservations} cr WHERE cr.item_id = ${items.id} AND cr.ended_at IS NULL)`,
      ),
    )
    .orderBy(asc(items.identity));
}

/**
 * Boards as pairing takes them: band levels over `bands` from each board's newest response; a
 * board with none (or one that does not cover the bands) is not ready, with the reason.
 */
export async function boardUnitsOf(db: DbOrTx, boards: { id: string; identity: string }[], bands: ReturnType<typeof thirdOctaveBands>): Promise<Pick<CrossoverMatchView, "units" | "notReady">> {
  const ids = boards.map((b) => b.id);
  const latest = ids.length
    ? await db
        .select({ itemId: responses.itemId, points: responses.points })
        .from(responses)
        .where(and(inArray(responses.itemId, ids), eq(responses.purpose, "unit"), sql`${responses.id} = (SELECT max(r2.id) FROM responses r2 WHERE r2.item_id = ${responses.itemId} AND r2.purpose = 'unit')`))
    : [];
  const pointsOf = new Map(latest.map((r) => [r.itemId, r.points]));
  const units: CrossoverMatchView["units"] = [];
  const notReady: CrossoverMatchView["notReady"] = [];
  for (const b of boards) {
    const points = pointsOf.get(b.id);
    if (!points) {
      notReady.push({ identity: b.identity, reason: "no response measured yet" });
      continue;
    }
    try {
      const levels = bandLevels(points.map(([hz, db]) => ({ hz: hz!, db: db! })), bands);
      units.push({ id: b.identity, itemId: b.id, identity: b.identity, levels, points });
    } catch (e) {
      notReady.push({ identity: b.identity, reason: (e as Error).message });
    }
  }
  return { units, notReady };
}

/**
 * The optimal plan for a model's boards that passed their check, have a response and are in no
 * open set: band levels over the model's response range in one-third octaves, then `planPairs`.
 */
export async function matchCrossovers(db: DbOrTx, input: { modelId: string; limitDb: number }): Promise<CrossoverMatchView> {
  const model = await modelById(db, input.modelId);
  checkLimit(model, input.limitDb);
  const bands = thirdOctaveBands(model.responseMinHz, model.responseMaxHz);
  const { free: boards, quarantined } = await withoutQuarantined(db, await boardsInStock(db, model.id));
  const { units, notReady } = await boardUnitsOf(db, boards, bands);
  const plan = planPairs(units, { limitDb: input.limitDb, bandLabels: bands.map((b) => bandLabel(b.nominal)) });
  return { model, bands, units, notReady, quarantined, plan, limitDb: input.limitDb };
}

/** Thrown when boards of a plan were reserved by someone else first (status 409). */
export class BoardsTakenError extends UnitsTakenError {
  constructor(taken: string[]) {
    super(taken);
    this.message = `${taken.join(", ")} ${taken.length === 1 ? "was" : "were"} reserved a moment ago by another plan. Nothing was saved; the plan below is worked out again from the boards still free.`;
    this.name = "BoardsTakenError";
  }
}

/**
 * Accepts a plan of crossover pairs: each pair becomes a matched set (kind "crossover", code
 * M-X-<MODEL>-NNN) whose boards are reserved, left and right, for one future speaker pair. The
 * plan is worked out again inside the transaction from the measurements, so a pair over the limit
 * or a board someone else reserved first is refused whatever the browser sends; of two
 * acceptances at once, exactly one succeeds.
 */
export async function acceptCrossoverPlan(db: DbOrTx, input: { modelId: string; limitDb: number; pairs: { a: string; b: string }[] }, actor: LabActor) {
  const model = await modelById(db, input.modelId);
  checkLimit(model, input.limitDb);
  if (!input.pairs.length) throw new AppError(400, "The plan has no pair to accept.");
  const ids = input.pairs.flatMap((p) => [p.a, p.b]);
  if (new Set(ids).size !== ids.length) throw new AppError(400, "A board appears in two pairs of the plan.");
  const held = async (h: DbOrTx) => [
    ...(
      await h
        .select({ identity: items.identity })
        .from(setMembers)
        .innerJoin(items, eq(items.id, setMembers.itemId))
        .where(and(inArray(items.identity, ids), isNull(setMembers.endedAt)))
    ).map((r) => r.identity),
    // Held by a service case (migration 0033 refuses a set for it).
    ...(
      await h
        .select({ identity: items.identity })
        .from(caseReservations)
        .innerJoin(items, eq(items.id, caseReservations.itemId))
        .where(and(inArray(items.identity, ids), isNull(caseReservations.endedAt)))
    ).map((r) => r.identity),
  ];
  try {
    return await db.transaction(async (tx) => {
      const view = await matchCrossovers(tx, { modelId: model.id, limitDb: input.limitDb });
      const byId = new Map(view.units.map((u) => [u.id, u]));
      await refuseQuarantinedIn(tx, view.quarantined, ids);
      const missing = ids.filter((id) => !byId.has(id));
      if (missing.length) {
        const taken = await held(tx);
        if (taken.length) throw new BoardsTakenError(taken);
        throw new AppError(409, `${missing.join(", ")} ${missing.length === 1 ? "is" : "are"} not a measured, checked ${model.code} board free to pair. Nothing was saved; the plan below is worked out again.`);
      }
      const [count] = await tx.select({ n: sql<number>`count(*)` }).from(matchedSets).where(like(matchedSets.code, `M-X-${model.code}-%`));
      let n = Number(count?.n ?? 0);
      const out: { code: string; left: string; right: string }[] = [];
      for (const p of input.pairs) {
        const a = byId.get(p.a)!;
        const b = byId.get(p.b)!;
        const c = pairCost(a, b);
        if (c.maxDiffDb > input.limitDb + 1e-9) {
          throw new AppError(400, `${a.identity} and ${b.identity} differ by ${formatDb(c.maxDiffDb)} at ${bandLabel(view.bands[c.worstBand]?.nominal ?? "?")}, over the ${formatLimitDb(input.limitDb)} limit. Nothing was saved.`);
        }
        const id = newId();
        const code = `M-X-${model.code}-${String(++n).padStart(3, "0")}`;
        const eventId = await appendEvent(tx, {
          actorId: actor.id,
          station: recorder(actor).station,
          type: "set.matched",
          subjectKind: "set",
          subjectId: id,
          data: { code, kind: "crossover", left: a.identity, right: b.identity, cost: c.cost, maxDiffDb: c.maxDiffDb, limitDb: input.limitDb, model: model.code, ...machineData(actor) },
        });
        await tx.insert(matchedSets).values({ id, code, kind: "crossover", partType: null, batchId: null, modelId: model.id, cost: c.cost, maxDiffDb: c.maxDiffDb, limitDb: input.limitDb, eventId, createdAt: now() });
        await tx.insert(setMembers).values([
          { setId: id, itemId: a.itemId, side: "L" },
          { setId: id, itemId: b.itemId, side: "R" },
        ]);
        for (const u of [a, b]) {
          const [item] = await tx.select().from(items).where(eq(items.id, u.itemId)).limit(1);
          await changeState(tx, item!, "reserved", recorder(actor), { set: code, ...machineData(actor) });
        }
        out.push({ code, left: a.identity, right: b.identity });
      }
      return out;
    });
  } catch (e) {
    if (e instanceof AppError) throw e;
    // Another process reserved a board between our read and our write: the partial unique index said no.
    if (isConstraintError(e, "UNIQUE")) throw new BoardsTakenError(await held(db));
    throw e;
  }
}
