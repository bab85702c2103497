import "server-only";
/**
 * Dispatch: packing a tested pair into its carton, where cartons are stored, shipping cartons to
 * a dealer (with the dealer's e-mail and every pair's certificate), the carton label and the
 * public certificate check. Everything that writes runs in one transaction and appends events.
 */
import type { Actor } from "@/lib/vocabulary/actor";
import { and, eq, isNull, sql } from "drizzle-orm";
import type { Db, DbOrTx, Tx } from "@/db";
import { cartonLocations, certificates, dealers, finishes, items, links, models, shipmentDetails, type Item } from "@/db/schema";
import { AppError } from "@/lib/auth/errors";
import { issueCertificate } from "@/lib/certificates";
import { now as clockNow } from "@/lib/clock";
import { holdRefusal } from "@/lib/containments/holds";
import { appendEvent } from "@/lib/events/queries";
import { queueMail } from "@/lib/mail/outbox";
import { changeState, createItem, fit, itemByIdentity, type Recorder } from "@/lib/genealogy/graph";
import { KIND_WORD, stateLabel } from "@/lib/vocabulary/item-kinds";
import { allocateSerial } from "@/lib/serials/allocator";
import { normaliseScan, parseSerial } from "@/lib/serials/format";
import { isValidGtin } from "@/lib/serials/gs1";
import { nearMisses } from "@/lib/serials/suggest";
import { sameScannedCode } from "@/lib/gs1";
import { pairOfSpeaker } from "@/lib/genealogy/pair-speakers";
import { isCalendarDay, isoDay, noonUtc } from "./dates";
import { packingLines, sameLabel, type PackingLine } from "./packing-list";
import { assignSscc, packingGs1Settings } from "./sscc";
import { modelSpecOf } from "@/lib/workshop/model-spec-of";

export { cartonLabelPdf, cartonLabelData, renderCartonLabel, CARTON_LABEL_LAYOUT, type CartonLabelData } from "./carton-label";
export { verifyCertificate, type VerifiedCertificate } from "./verify";
export { deliveryNoteData, deliveryNotePdf, renderDeliveryNote, type DeliveryNoteData, type DeliveryNoteCarton } from "./delivery-note";
export { DEFAULT_PACKING_LIST, ensurePackingLists, FIXED_PACKING_ITEMS, packingLines, packingList, type PackingLine, type PackingLineMode } from "./packing-list";
export { assignSscc, packingGs1Settings, ssccsOf, type CartonSsccFacts } from "./sscc";
export { readyToPack, waitingToShip, shippedOn, pairForPacking, knownLocations, shipmentFacts, type ReadyPair, type WaitingCarton, type ShippedCarton, type PairForPacking, type ShipmentFacts } from "./queries";

export const STATION = "packing";

/** The state a pair may be packed from: its final test passed, or quality accepted its deviation. */
export const PACKABLE_STATES = ["ready_to_pack"] as const;

const LOCATION_MAX = 60;
const TEXT_MAX = 80;

const recorder = (actor: Actor): Recorder => ({ actorId: actor.id, station: STATION });

/** An item by what was scanned or typed: a serial with a wrong check character is not guessed at. */
async function findItem(db: DbOrTx, text: string): Promise<Item | null> {
  const t = normaliseScan(text);
  if (!t) return null;
  const parsed = parseSerial(t);
  return itemByIdentity(db, parsed?.valid ? parsed.canonical : t);
}

/** The carton a pair sits in now, if any. */
export async function cartonOf(db: DbOrTx, pairId: string): Promise<Item | null> {
  const [row] = await db
    .select({ carton: items })
    .from(links)
    .innerJoin(items, eq(items.id, links.parentId))
    .where(and(eq(links.childId, pairId), isNull(links.endedAt), eq(items.kind, "carton")))
    .limit(1);
  return row?.carton ?? null;
}

/** The pair a carton holds at PAIR now, if any. */
async function pairIn(db: DbOrTx, cartonId: string): Promise<Item | null> {
  const [row] = await db
    .select({ pair: items })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, cartonId), eq(links.position, "PAIR"), isNull(links.endedAt)))
    .limit(1);
  return row?.pair ?? null;
}

/** The pair's speakers now: they share the pair's fate, packed and shipped with it. */
async function speakersOf(db: DbOrTx, pairId: string): Promise<Item[]> {
  const rows = await db
    .select({ speaker: items })
    .from(links)
    .innerJoin(items, eq(items.id, links.childId))
    .where(and(eq(links.parentId, pairId), isNull(links.endedAt), eq(items.kind, "speaker")));
  return rows.map((r) => r.speaker);
}

/** The shipment a carton sits in now, if any. */
async function shipmentOf(db: DbOrTx, cartonId: string): Promise<Item | null> {
  const [row] = await db
    .select({ shipment: items })
    .from(links)
    .innerJoin(items, eq(items.id, links.parentId))
    .where(and(eq(links.childId, cartonId), isNull(links.endedAt), eq(items.kind, "shipment")))
    .limit(1);
  return row?.shipment ?? null;
}

function cleanLocation(location: string): string {
  const l = location.trim().replace(/\s+/g, " ");
  if (l === "") throw new AppError(400, "Say where the carton is stored, e.g. Rack B, shelf 2.", { location: ["Say where the carton is stored, e.g. Rack B, shelf 2."] });
  if (l.length > LOCATION_MAX) throw new AppError(400, `The storage location is at most ${LOCATION_MAX} characters.`, { location: [`At most ${LOCATION_MAX} characters.`] });
  return l;
}

const listing = (names: string[]) => (names.length <= 1 ? names.join("") : `${names.slice(0, -1).join(", ")} and ${names[names.length - 1]}`);

/** Why a pair cannot be packed, in words for the packer; null when it can. */
async function packRefusal(db: DbOrTx, pair: Item): Promise<string | null> {
  if ((PACKABLE_STATES as readonly string[]).includes(pair.state)) return holdRefusal(db, pair, "be packed");
  if (pair.state === "packed") {
    const carton = await cartonOf(db, pair.id);
    return `${pair.identity} is already packed${carton ? `, in carton ${carton.identity}` : ""}.`;
  }
  if (pair.state === "shipped") return `${pair.identity} has already shipped.`;
  return `${pair.identity} is ${stateLabel(pair.state)}: only a pair that has passed its final test can be packed.`;
}

export interface PackResult {
  pair: Item;
  carton: Item;
  certificateId: string;
  location: string;
  /** The carton's SSCC, 18 digits. */
  sscc: string;
}

export interface PackInput {
  pairIdentity: string;
  /** The serials scanned into the left and right speakers' boxes. */
  left: string;
  right: string;
  /** The codes scanned for the accessories that carry one, in the order of packingLines' "scan" lines. */
  scans?: string[];
  /** The ticked lines without a code (the certificate, a manual). */
  checked: string[];
  location: string;
}

/** The field a scan line's answer and error go under: "scan-0", "scan-1"… */
export const scanField = (i: number) => `scan-${i}`;

/**
 * Why the serial scanned into one side's box is not that side's speaker of this pair, in words
 * for the packer; null when it is. A slipped check character is answered with the serial it
 * most likely was, when that one exists.
 */
async function speakerScanProblem(db: DbOrTx, pair: Item, side: "L" | "R", text: string): Promise<string | null> {
  const sideWord = side === "L" ? "left" : "right";
  const t = normaliseScan(text);
  if (!t) return `Scan the ${sideWord} speaker's serial.`;
  const parsed = parseSerial(t);
  if (parsed && !parsed.valid) {
    const near: string[] = [];
    for (const candidate of nearMisses(parsed.canonical)) if (await itemByIdentity(db, candidate)) near.push(candidate);
    return `${t} does not add up: its check character is wrong.${near.length ? ` Did you mean ${listing(near)}? Scan the label again.` : " Scan the label again."}`;
  }
  const item = await itemByIdentity(db, parsed?.canonical ?? t);
  if (!item) return `${parsed?.canonical ?? t} is not a serial in the register.`;
  if (item.kind !== "speaker") return `${item.identity} is ${/^[aeiou]/.test(KIND_WORD[item.kind]) ? "an" : "a"} ${KIND_WORD[item.kind]}, not a speaker: scan the ${sideWord} speaker's own label.`;
  const place = await pairOfSpeaker(db, item.id);
  if (!place || place.pair.id !== pair.id) {
    return `${item.identity} belongs to ${place ? `pair ${place.pair.identity}` : "no pair"}, not to ${pair.identity}: this speaker goes in another carton.`;
  }
  if (place.side !== side) return `${item.identity} is this pair's ${place.side === "L" ? "left" : "right"} speaker: scan it into the ${place.side === "L" ? "left" : "right"} speaker's box.`;
  return null;
}

/**
 * Packs a pair that passed its final test. The server checks everything the packer scanned: each
 * side's serial is that side's speaker of this pair, each accessory with a code was scanned with
 * that code, every other line is ticked, and the location is given; any problem is answered under
 * its own field and nothing is written. Then, in one transaction: the certificate (if the pair
 * has none yet), the carton with its SSCC holding the pair at PAIR, where it is stored, and the
 * pair and its two speakers marked packed (each with its state-change event).
 */
export async function packPair(db: Db, input: PackInput, actor: Actor): Promise<PackResult> {
  const pair = await findItem(db, input.pairIdentity);
  if (!pair || pair.kind !== "pair") throw new AppError(404, `${input.pairIdentity.trim() || "That"} is not a pair in the register.`);
  const refusal = await packRefusal(db, pair);
  if (refusal) throw new AppError(409, refusal);
  if (!pair.modelId) throw new AppError(409, `${pair.identity} has no model, so it has no packing list or GTIN.`);
  // The packing list and GTIN of the model version the pair was started under.
  const model = await modelSpecOf(db, pair);
  if (!model) throw new AppError(409, `${pair.identity} has no model, so it has no packing list or GTIN.`);
  // A carton label carries the GTIN; a wrong one must be put right before a carton is made.
  if (!isValidGtin(model.pairGtin) || model.pairGtin.length !== 14) {
    throw new AppError(409, `The pair GTIN of ${model.code} (${model.pairGtin}) is not a valid GTIN-14. Ask an administrator to correct the model before packing.`);
  }
  const gs1 = packingGs1Settings();

  const errors: Record<string, string[]> = {};
  const add = (field: string, message: string) => (errors[field] ??= []).push(message);
  const lines = await packingLines(db, pair);
  for (const [field, side] of [["left", "L"], ["right", "R"]] as const) {
    const problem = await speakerScanProblem(db, pair, side, input[field]);
    if (problem) add(field, problem);
  }
  const scanLines = lines.filter((l) => l.mode === "scan");
  const scans = input.scans ?? [];
  scanLines.forEach((line, i) => {
    const got = (scans[i] ?? "").trim();
    if (!got) add(scanField(i), `Scan the code of ${line.label}.`);
    else if (!sameScannedCode(line.code!, got)) add(scanField(i), `${got} is not the code of ${line.label} (${line.code}): scan the right item.`);
  });
  if (scans.length > scanLines.length) add("checked", "More codes were scanned than the packing list has lines with a code; reload the page and scan again.");
  const tickLines = lines.filter((l) => l.mode === "tick").map((l) => l.label);
  const checked = input.checked.map((c) => c.trim()).filter(Boolean);
  const stray = checked.filter((c) => !lines.some((l) => sameLabel(l.label, c)));
  if (stray.length) add("checked", `${listing(stray.map((s) => `"${s}"`))} ${stray.length === 1 ? "is" : "are"} not on the packing list of ${model.code}; reload the page and tick again.`);
  const missing = tickLines.filter((l) => !checked.some((c) => sameLabel(l, c)));
  if (missing.length) add("checked", `Tick every item: ${listing(missing)} ${missing.length === 1 ? "is" : "are"} not ticked.`);
  try {
    cleanLocation(input.location);
  } catch (e) {
    if (!(e instanceof AppError)) throw e;
    add("location", e.message);
  }
  if (Object.keys(errors).length) {
    const all = Object.values(errors).flat();
    throw new AppError(400, all.length === 1 ? `Nothing was packed: ${all[0]}` : "Nothing was packed: some fields need attention.", errors);
  }
  const location = cleanLocation(input.location);
  const list = lines.map((l) => l.label);

  const by = recorder(actor);
  const packedOn = isoDay(clockNow());
  return db.transaction(async (tx) => {
    // Read again inside the transaction: someone may have packed it since the checks above.
    const current = (await itemByIdentity(tx, pair.identity))!;
    const again = await packRefusal(tx, current);
    if (again) throw new AppError(409, again);
    const speakers = await speakersOf(tx, current.id);

    const identity = await allocateSerial(tx, { kind: "carton", code: model.code, year: Number(packedOn.slice(0, 4)) });
    const carton = await createItem(
      tx,
      { kind: "carton", identity, state: "packed", modelId: model.id, finishId: current.finishId, attrs: { gtin: model.pairGtin, packedOn } },
      by,
    );
    const sscc = await assignSscc(tx, carton, gs1);
    await fit(tx, { parent: carton, child: current, position: "PAIR", data: { sscc, speakers: speakers.map((s) => s.identity) } }, by);
    await storeAt(tx, carton, location, actor, "carton.stored");
    await changeState(tx, current, "packed", by, { carton: identity });
    for (const speaker of speakers) await changeState(tx, speaker, "packed", by, { pair: current.identity, carton: identity });
    await appendEvent(tx, {
      ...by,
      type: "pair.packed",
      subjectKind: "item",
      subjectId: current.id,
      data: {
        identity: current.identity,
        carton: identity,
        sscc,
        location,
        checklist: list,
        speakers: Object.fromEntries(speakers.map((s) => [s.identity, "scanned"])),
        accessories: scannedRecord(lines, input),
      },
    });
    // Last, once the pair is packed: a pair the demo history tested has no final-test record, and
    // issueCertificate accepts such a pair only once it has left the line (packed or shipped).
    const certificateId = await certificateFor(tx, current, actor);
    return { pair: current, carton, certificateId, location, sscc };
  });
}

/** What was scanned in, for the packing event: each accessory's code as read. */
function scannedRecord(lines: PackingLine[], input: PackInput): Record<string, string> {
  const out: Record<string, string> = {};
  lines.filter((l) => l.mode === "scan").forEach((l, i) => (out[l.label] = (input.scans?.[i] ?? "").trim()));
  return out;
}

/** The pair's certificate id, issuing it first when it has none (demo pairs packed in the history have none). */
async function certificateFor(tx: Tx, pair: Item, actor: Actor): Promise<string> {
  const [existing] = await tx.select({ id: certificates.id }).from(certificates).where(eq(certificates.pairId, pair.id)).limit(1);
  if (existing) return existing.id;
  // issueCertificate is typed for a Db and opens its own transaction; given ours, Drizzle nests it
  // as a savepoint, so the certificate commits or rolls back with the packing or the shipment.
  const issued = await issueCertificate(tx as unknown as Db, pair.id, actor.id);
  return issued.id;
}

async function storeAt(tx: Tx, carton: Item, location: string, actor: Actor, type: "carton.stored" | "carton.moved", from?: string) {
  const eventId = await appendEvent(tx, {
    ...recorder(actor),
    type,
    subjectKind: "item",
    subjectId: carton.id,
    data: { identity: carton.identity, location, ...(from !== undefined ? { from } : {}) },
  });
  await tx.insert(cartonLocations).values({ cartonId: carton.id, location, eventId, at: clockNow() });
}

/** Where a carton is stored now (the newest location row), or null. */
export async function cartonLocation(db: DbOrTx, cartonId: string): Promise<string | null> {
  const [row] = await db
    .select({ location: cartonLocations.location })
    .from(cartonLocations)
    .where(eq(cartonLocations.cartonId, cartonId))
    .orderBy(sql`${cartonLocations.id} DESC`)
    .limit(1);
  return row?.location ?? null;
}

/** Records a packed carton's new storage place (appended; the newest counts). */
export async function moveCarton(db: Db, input: { carton: string; location: string }, actor: Actor): Promise<{ carton: Item; location: string }> {
  const carton = await findItem(db, input.carton);
  if (!carton || carton.kind !== "carton") throw new AppError(404, `${input.carton.trim() || "That"} is not a carton in the register.`);
  const location = cleanLocation(input.location);
  return db.transaction(async (tx) => {
    const current = (await itemByIdentity(tx, carton.identity))!;
    if (current.state !== "packed") throw new AppError(409, `${current.identity} is ${stateLabel(current.state)}: only a packed carton waiting to ship has a storage place.`);
    const from = await cartonLocation(tx, current.id);
    if (from !== null && sameLabel(from, location)) throw new AppError(409, `${current.identity} is already at ${from}.`, { location: [`It is already at ${from}.`] });
    await storeAt(tx, current, location, actor, "carton.moved", from ?? undefined);
    return { carton: current, location };
  });
}

export interface ShipInput {
  dealerId: string;
  cartons: string[];
  /** YYYY-MM-DD, today or earlier. */
  shippedOn: string;
  carrier: string;
  tracking: string;
}

export interface ShipResult {
  shipment: Item;
  /** The dealer's queued e-mail; null only when importing history (`dealerMail: false`). */
  mailId: number | null;
  pairs: { pair: string; carton: string; certificateId: string }[];
}

const oneLine = (v: string) => v.trim().replace(/\s+/g, " ");

/** "5 December 2026" for a YYYY-MM-DD day, as a letter writes it. */
const longDay = (day: string) => (isCalendarDay(day) ? new Intl.DateTimeFormat("en-GB", { day: "numeric", month: "long", year: "numeric", timeZone: "UTC" }).format(noonUtc(day)) : day);

/** Plural for the mail: "1 matched pair", "2 matched pairs". */
const pairsWord = (n: number) => `${n} matched pair${n === 1 ? "" : "s"}`;

interface ShipLine {
  carton: Item;
  pair: Item;
  certificateId: string;
  model: string;
  modelCode: string;
  finish: string;
}

export interface ShipOptions {
  /**
   * False records the shipment without queuing the dealer's e-mail. Only for importing history
   * (the demo seed's two invented years, whose dealers must not be written to now); no request
   * reaches it: the packers' action never passes options.
   */
  dealerMail?: boolean;
}

/**
 * Ships packed cartons to a dealer: one shipment item (H-<dealer>-…) holding each carton at
 * "1", "2"…, its particulars, cartons, pairs and their speakers marked shipped, and ONE e-mail to the dealer,
 * queued in the same transaction, listing every pair with its certificate attached (rendered
 * when the mail is sent). Refuses unknown, unpacked or shipped cartons, a date in the future and
 * an empty carrier or tracking number, writing nothing.
 */
export async function shipCartons(db: Db, input: ShipInput, actor: Actor, options: ShipOptions = {}): Promise<ShipResult> {
  const errors: Record<string, string[]> = {};
  const add = (field: string, message: string) => (errors[field] ??= []).push(message);

  const [dealer] = input.dealerId ? await db.select().from(dealers).where(eq(dealers.id, input.dealerId)).limit(1) : [];
  if (!dealer) add("dealerId", "Choose the dealer the cartons go to.");
  else if (!dealer.active) add("dealerId", `${dealer.name} is no longer an active dealer.`);
  // The mail goes in the same transaction: a dealer without a usable address would fail it late.
  else if (!dealer.email.trim() || /[\r\n]/.test(dealer.email)) add("dealerId", `${dealer.name} has no usable e-mail address; ask an administrator to correct it.`);

  const today = isoDay(clockNow());
  const shippedOn = input.shippedOn.trim();
  if (!isCalendarDay(shippedOn)) add("shippedOn", "Give the date the cartons left, as YYYY-MM-DD.");
  else if (shippedOn > today) add("shippedOn", `The date is in the future: the cartons cannot have left after today (${today}).`);

  const carrier = oneLine(input.carrier);
  const tracking = oneLine(input.tracking);
  if (!carrier) add("carrier", "Name the carrier.");
  else if (carrier.length > TEXT_MAX) add("carrier", `At most ${TEXT_MAX} characters.`);
  if (!tracking) add("tracking", "Give the carrier's tracking number.");
  else if (tracking.length > TEXT_MAX) add("tracking", `At most ${TEXT_MAX} characters.`);

  const asked = input.cartons.map((c) => c.trim()).filter(Boolean);
  if (asked.length === 0) add("cartons", "Tick at least one carton to ship.");
  const seen = new Set<string>();
  const found: Item[] = [];
  for (const text of asked) {
    const carton = await findItem(db, text);
    if (!carton || carton.kind !== "carton") {
      add("cartons", `${text} is not a carton in the register.`);
      continue;
    }
    if (seen.has(carton.id)) {
      add("cartons", `${carton.identity} is listed twice.`);
      continue;
    }
    seen.add(carton.id);
    found.push(carton);
  }

  const refusal = async (db: DbOrTx, carton: Item): Promise<string | null> => {
    if (carton.state === "shipped") {
      const shipment = await shipmentOf(db, carton.id);
      return `${carton.identity} has already shipped${shipment ? ` (${shipment.identity})` : ""}.`;
    }
    if (carton.state !== "packed") return `${carton.identity} is ${stateLabel(carton.state)}, not packed and waiting to ship.`;
    if (await shipmentOf(db, carton.id)) return `${carton.identity} is already in a shipment.`;
    if (!(await pairIn(db, carton.id))) return `${carton.identity} holds no pair.`;
    return null;
  };
  // A carton whose pair an open containment holds stays at dispatch: a conflict, not bad input.
  let held = false;
  for (const carton of found) {
    const why = await refusal(db, carton);
    const hold = why ? null : await holdRefusal(db, carton, "be shipped");
    if (why) add("cartons", why);
    if (hold) {
      add("cartons", hold);
      held = true;
    }
  }

  if (Object.keys(errors).length) {
    const first = Object.values(errors).flat();
    throw new AppError(held ? 409 : 400, first.length === 1 ? `Nothing was shipped: ${first[0]}` : "Nothing was shipped: some fields need attention.", errors);
  }

  const by = recorder(actor);
  return db.transaction(async (tx) => {
    const lines: ShipLine[] = [];
    for (const c of found) {
      const carton = (await itemByIdentity(tx, c.identity))!;
      const why = (await refusal(tx, carton)) ?? (await holdRefusal(tx, carton, "be shipped"));
      if (why) throw new AppError(409, `Nothing was shipped: ${why}`, { cartons: [why] });
      const pair = (await pairIn(tx, carton.id))!;
      const [names] = await tx
        .select({ model: models.name, modelCode: models.code, finish: finishes.name })
        .from(items)
        .leftJoin(models, eq(models.id, items.modelId))
        .leftJoin(finishes, eq(finishes.id, items.finishId))
        .where(eq(items.id, pair.id));
      // Before any state changes: the certificate is issued to the pair as it stood when packed.
      const certificateId = await certificateFor(tx, pair, actor);
      lines.push({ carton, pair, certificateId, model: names?.model ?? "", modelCode: names?.modelCode ?? "", finish: names?.finish ?? "" });
    }

    let identity: string;
    try {
      identity = await allocateSerial(tx, { kind: "shipment", code: dealer!.code, year: Number(shippedOn.slice(0, 4)) });
    } catch (e) {
      throw new AppError(409, `A shipment serial cannot be made for dealer code ${dealer!.code}: ${(e as Error).message}`);
    }
    const shipment = await createItem(tx, { kind: "shipment", identity, state: "shipped", dealerId: dealer!.id, attrs: { shippedOn, carrier, tracking } }, by);
    const eventId = await appendEvent(tx, {
      ...by,
      type: "shipment.dispatched",
      subjectKind: "item",
      subjectId: shipment.id,
      data: { identity, dealer: dealer!.code, shippedOn, carrier, tracking, cartons: lines.map((l) => l.carton.identity), ...(options.dealerMail === false ? { dealerMail: false } : {}) },
    });
    await tx.insert(shipmentDetails).values({ itemId: shipment.id, dealerId: dealer!.id, shippedOn, carrier, tracking, eventId });

    const pairs: ShipResult["pairs"] = [];
    for (const [i, line] of lines.entries()) {
      await fit(tx, { parent: shipment, child: line.carton, position: String(i + 1) }, by);
      await changeState(tx, line.carton, "shipped", by, { shipment: identity });
      await changeState(tx, line.pair, "shipped", by, { shipment: identity });
      for (const speaker of await speakersOf(tx, line.pair.id)) await changeState(tx, speaker, "shipped", by, { pair: line.pair.identity, shipment: identity });
      await appendEvent(tx, {
        ...by,
        type: "pair.shipped",
        subjectKind: "item",
        subjectId: line.pair.id,
        data: { identity: line.pair.identity, carton: line.carton.identity, shipment: identity, dealer: dealer!.code },
      });
      pairs.push({ pair: line.pair.identity, carton: line.carton.identity, certificateId: line.certificateId });
    }

    if (options.dealerMail === false) return { shipment, mailId: null, pairs };
    const mail = shipmentMail({
      dealerName: dealer!.name,
      shipment: identity,
      shippedOn,
      carrier,
      tracking,
      lines: lines.map((l) => ({ model: l.model, modelCode: l.modelCode, finish: l.finish, pair: l.pair.identity, carton: l.carton.identity })),
    });
    const mailId = await queueMail(tx, {
      to: dealer!.email,
      subject: mail.subject,
      text: mail.text,
      eventId,
      attachments: [
        { kind: "delivery_note" as const, shipmentId: shipment.id, filename: `delivery-note-${identity}.pdf` },
        ...pairs.map((p) => ({ kind: "certificate" as const, certificateId: p.certificateId, filename: `certificate-${p.pair}.pdf` })),
      ],
    });
    return { shipment, mailId, pairs };
  });
}

/** The dealer's e-mail: what was sent, how to follow it, and which certificates are attached. */
export function shipmentMail(input: {
  dealerName: string;
  shipment: string;
  shippedOn: string;
  carrier: string;
  tracking: string;
  lines: { model: string; modelCode: string; finish: string; pair: string; carton: string }[];
}) {
  const n = input.lines.length;
  const subject = `Shipped: ${pairsWord(n)}, tracking ${input.tracking}`;
  const text = [
    `Hello ${input.dealerName},`,
    "",
    `${pairsWord(n)} left the workshop on ${longDay(input.shippedOn)} with ${input.carrier}, tracking number ${input.tracking} (shipment ${input.shipment}).`,
    "",
    ...input.lines.map((l, i) => `${i + 1}. ${[l.modelCode, l.model].filter(Boolean).join(" ")}, ${l.finish || "no finish recorded"}: pair ${l.pair} (carton ${l.carton})`),
    "",
    `The delivery note is attached, with each carton's SSCC to check against its label on arrival. The certificate of each pair is attached as a PDF copy; the original travels in its carton. Each certificate carries a code the owner can check online.`,
    "",
    "Packed pairs are heavy: lift each carton with two people or a lifting aid.",
    "",
    "Twinleaf",
    "",
  ].join("\n");
  return { subject, text };
}
