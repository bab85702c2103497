import { ROLE_LABELS, isRole } from "@/lib/auth/roles";
import { CASE_STATE_WORDS, isCaseState } from "@/lib/vocabulary/case-states";
import { bandLabel, formatDb, formatHz } from "@/lib/certificates/figures";
import { formatCalendarDay } from "@/lib/format";
import { parseSerial } from "@/lib/serials/format";
import type { EventType } from "@/lib/vocabulary/event-types";
import { EVENT_PHRASES, isEventType } from "@/lib/vocabulary/event-types";
import { dispositionPhrase, ncWhere, type Disposition } from "@/lib/route/words";
import { KIND_WORD, isItemKind, stateLabel } from "@/lib/vocabulary/item-kinds";
import { partWord } from "@/lib/vocabulary/part-types";
import { BATCH_POSITION, CROSSOVER_POSITION, FLITCH_POSITION, MAKER_LOT_POSITION, SPEAKER_CABINET_POSITION, positionName, sideOfCabinetPosition } from "@/lib/vocabulary/positions";
import { isSide, sideWord } from "@/lib/vocabulary/sides";

type Data = Record<string, unknown>;

const DISPOSITIONS: readonly string[] = ["rework", "use_as_is", "scrap", "entry_error"] satisfies Disposition[];

const str = (d: Data, k: string): string => (typeof d[k] === "string" ? (d[k] as string) : "");
const num = (d: Data, k: string): number | null => (typeof d[k] === "number" && Number.isFinite(d[k]) ? (d[k] as number) : null);
const list = (d: Data, k: string): unknown[] => (Array.isArray(d[k]) ? (d[k] as unknown[]) : []);
const plural = (n: number, word: string, many = `${word}s`) => `${n} ${n === 1 ? word : many}`;
/** "3, 5 and 7". */
const and = (items: string[]) => (items.length <= 1 ? items.join("") : `${items.slice(0, -1).join(", ")} and ${items[items.length - 1]}`);
const day = (iso: string) => (/^\d{4}-\d{2}-\d{2}$/.test(iso) ? formatCalendarDay(iso) : iso);
const roleList = (v: unknown[]) => and(v.map((r) => (typeof r === "string" && isRole(r) ? ROLE_LABELS[r] : String(r))));

/** The kind of thing a serial names, from its kind letter; null for a leaf or anything unparsed. */
function kindOfSerial(identity: string): string | null {
  const parsed = parseSerial(identity);
  return parsed?.valid ? parsed.kind : null;
}

/**
 * A position in its holder, in words: "tweeter (T)", "left speaker", "left cabinet", "face leaf 2",
 * "carton 2" (of a shipment); "" where the holder says it all (a pair in its carton).
 */
export function positionWords(holderKind: string | null, position: string): string {
  const cabinetSide = sideOfCabinetPosition(position);
  if (position === "PAIR" || (holderKind === "carton" && position === "")) return "";
  if (holderKind === "shipment" && /^\d+$/.test(position)) return `carton ${position}`;
  if (cabinetSide) return `${sideWord(cabinetSide)} cabinet`;
  if (isSide(position) && (holderKind === "pair" || holderKind === null)) return `${sideWord(position)} speaker`;
  if (position === SPEAKER_CABINET_POSITION) return "cabinet";
  if (position === CROSSOVER_POSITION) return "crossover";
  if (/^[TMB]-?\d*$/.test(position)) return positionName(position);
  if (/^F\d+$/.test(position)) return `face leaf ${position.slice(1)}`;
  // A source a part came from: "batch", "maker's lot", "flitch".
  if (position === BATCH_POSITION || position === MAKER_LOT_POSITION || position === FLITCH_POSITION) return positionName(position);
  return position ? `position ${position}` : "";
}

/**
 * Where a part sits, holder included: "carton K-…", "speaker S-…, as its tweeter (T)",
 * "shipment H-…, as its carton 2". Position codes never appear bare.
 */
export function placeWords(parent: string, position: string): string {
  const kind = kindOfSerial(parent);
  const holder = kind && isItemKind(kind) ? `${kind === "crossover" ? "crossover board" : KIND_WORD[kind]} ${parent}` : parent;
  const words = positionWords(kind, position);
  if (!words) return holder;
  return words.startsWith("position ") ? `${holder}, at ${words}` : `${holder}, as its ${words}`;
}

/** The Thiele–Small figures an event carries, with their units. */
function tsFigures(d: Data): string {
  const parts: string[] = [];
  const fs = num(d, "fsHz");
  if (fs !== null) parts.push(`Fs ${formatHz(fs)}`);
  for (const [key, label] of [["qts", "Qts"], ["qes", "Qes"], ["qms", "Qms"]] as const) {
    const v = num(d, key);
    if (v !== null) parts.push(`${label} ${Number(v.toPrecision(3))}`);
  }
  const re = num(d, "reOhm");
  if (re !== null) parts.push(`Re ${Number(re.toPrecision(3))} Ω`);
  const vas = num(d, "vasL");
  if (vas !== null) parts.push(`Vas ${Number(vas.toPrecision(3))} L`);
  const spl = num(d, "sensitivityDb");
  if (spl !== null) parts.push(`sensitivity ${Number(spl.toPrecision(3))} dB`);
  return parts.join(", ");
}

/** What a state change adds: the carton or shipment it came with. */
function stateContext(d: Data): string {
  if (str(d, "shipment")) return `, in shipment ${str(d, "shipment")}`;
  if (str(d, "carton")) return `, in carton ${str(d, "carton")}`;
  return "";
}

/** Names the event's data may need: dealer codes with their names. */
export interface DescribeContext {
  dealerNames?: Record<string, string>;
}

/** The sentence for an event's data; null to say the type's plain phrase instead. */
type Sentence = (d: Data, ctx: DescribeContext) => string | null;

/** A sentence that needs these fields; without them (data of an older shape) the plain phrase is said. */
const caseStateWords = (state: string): string => (isCaseState(state) ? CASE_STATE_WORDS[state].toLowerCase() : "another state");
const caseName = (d: Data): string => (str(d, "code") ? `service case ${str(d, "code")}` : "a service case");

const needs =
  (keys: string[], say: Sentence): Sentence =>
  (d, ctx) =>
    keys.every((k) => d[k] !== undefined && d[k] !== null && d[k] !== "") ? say(d, ctx) : null;

const dealer = (d: Data, ctx: DescribeContext) => {
  const code = str(d, "dealer");
  return ctx.dealerNames?.[code] ?? (code ? `dealer ${code}` : "the dealer");
};

/**
 * One sentence per event type, read after the actor's name ("Ann Webb packed the pair into carton
 * K-…"). A Record over the union: a new event type without its sentence does not compile.
 */
const SENTENCES: Record<EventType, Sentence> = {
  "user.signed_in": () => "signed in",
  "user.invited": (d) => `invited ${str(d, "email") || "a user"}${list(d, "roles").length ? ` as ${roleList(list(d, "roles"))}` : ""}`,
  "user.joined": () => "accepted the invitation and set a password",
  "user.roles_changed": (d) => `changed the roles from ${roleList(list(d, "from")) || "none"} to ${roleList(list(d, "to")) || "none"}`,
  "user.deactivated": () => "deactivated the account",
  "user.reactivated": () => "reactivated the account",
  "user.reset_requested": () => "asked for a password reset",
  "user.password_reset": () => "set a new password",
  "user.created": (d) => `created the account${list(d, "roles").length ? ` for ${roleList(list(d, "roles"))}` : ""}`,
  "model.created": () => "registered the model",
  "finish.created": () => "registered the finish",
  "dealer.created": () => "registered the dealer",
  "model.changed": (d) => `saved version ${num(d, "version") ?? "?"} of the model${list(d, "changed").length ? `, changing the ${list(d, "changed").join(", ")}` : ""}`,
  "model.retired": () => "retired the model from new work",
  "model.restored": () => "brought the model back into use",
  "finish.changed": (d) => `changed the finish${list(d, "changed").length ? `: the ${list(d, "changed").join(", ")}` : ""}`,
  "finish.retired": () => "retired the finish",
  "finish.restored": () => "brought the finish back into use",
  "dealer.changed": (d) => `changed the dealer's details${list(d, "changed").length ? `: the ${list(d, "changed").join(", ")}` : ""}`,
  "dealer.retired": () => "marked the dealer inactive",
  "dealer.restored": () => "marked the dealer active again",
  "owner.corrected": (d) => `corrected the owner's record${list(d, "changed").length ? `: the ${list(d, "changed").join(", ")}` : ""}`,
  "owner.merged": () => "merged a duplicate record of the owner into this one",
  "item.created": (d) => {
    const kind = str(d, "kind");
    return `registered the ${isItemKind(kind) ? KIND_WORD[kind] : "item"}`;
  },
  "item.state_changed": (d) =>
    str(d, "to") ? `changed its state${str(d, "from") ? ` from ${stateLabel(str(d, "from"))}` : ""} to ${stateLabel(str(d, "to"))}${stateContext(d)}` : "changed its state",
  "link.fitted": needs(["parent"], (d) => {
    const place = placeWords(str(d, "parent"), str(d, "position"));
    const replaces = str(d, "replaces") ? `, replacing ${str(d, "replaces")}` : "";
    return kindOfSerial(str(d, "parent")) === "carton" ? `packed it into ${place}` : kindOfSerial(str(d, "parent")) === "shipment" ? `loaded it into ${place}` : `fitted it into ${place}${replaces}`;
  }),
  "link.removed": needs(["parent"], (d) => `took it out of ${placeWords(str(d, "parent"), str(d, "position"))}${str(d, "replacedBy") ? `, for ${str(d, "replacedBy")}` : ""}`),
  "label.printed": (d) => (d.reprint ? "reprinted its label" : "printed its label"),
  "ownership.registered": (d) => (str(d, "via") === "owner registration" ? "registered as the owner, confirmed by e-mail" : "registered the owner"),
  "ownership.requested": () => "asked to register as an owner of the pair (waiting for the e-mail confirmation)",
  "event.corrected": (d) => (str(d, "field") ? `corrected an earlier record: the ${str(d, "field")} now reads "${str(d, "to")}"` : "corrected an earlier record"),
  "flitch.received": (d) => `received the flitch${str(d, "species") ? ` of ${str(d, "species").toLowerCase()}` : ""}${num(d, "leafCount") !== null ? `, ${plural(num(d, "leafCount")!, "leaf", "leaves")}` : ""}`,
  "leaf.measured": (d) => {
    const to = (d.to ?? {}) as Data;
    const size = num(to, "lengthMm") !== null && num(to, "widthMm") !== null ? `: ${num(to, "lengthMm")} × ${num(to, "widthMm")} mm` : "";
    return `recorded leaf ${num(d, "seq") ?? ""}${size}${to.usable === false ? ", not usable" : ""}`;
  },
  "leaf.defect_noted": needs(["kind"], (d) => `noted a defect on the leaf: ${str(d, "kind")}${str(d, "note") ? ` (${str(d, "note")})` : ""}`),
  "leaf.defect_cleared": needs(["kind"], (d) => `cleared a defect on the leaf: ${str(d, "kind")}`),
  "veneer.run_confirmed": needs(["pair"], (d) => {
    const nums = (k: string) => list(d, k).map(String).join(", ");
    const reserve = list(d, "reserve").length ? `; reserve leaf ${nums("reserve")}` : "";
    return `confirmed a bookmatched run for pair ${str(d, "pair")}: leaves ${nums("left")} on the left, ${nums("right")} turned over on the right${reserve}`;
  }),
  "veneer.reserve_released": needs(["cabinet", "leaf", "position"], (d) => `re-veneered cabinet ${str(d, "cabinet")} at face leaf ${str(d, "position").replace(/^F/, "")} with ${str(d, "leaf")}, replacing ${str(d, "replaces")}`),
  "veneer.reserve_returned": needs(["leaf", "pair"], (d) => `returned reserve leaf ${str(d, "leaf")} from pair ${str(d, "pair")}`),
  "cabinet.batch_started": needs(["model"], (d) => `made ${plural(num(d, "count") ?? 0, "lacquer cabinet")} of ${str(d, "model")}${str(d, "finish") ? ` in ${str(d, "finish")}` : ""}`),
  "upload.stored": (d) => `added ${str(d, "mime").startsWith("image/") ? "a photo" : "a file"}${str(d, "name") ? `, ${str(d, "name")}` : ""}`,
  "batch.received": needs(["code"], (d) => {
    const count = num(d, "count");
    const word = partWord(str(d, "partType"));
    return `received batch ${str(d, "code")}${count !== null ? `: ${plural(count, word)}` : ""}${str(d, "partNumber") ? `, part ${str(d, "partNumber")}` : ""}`;
  }),
  "trim.received": needs(["lot"], (d) => `received ${plural(num(d, "count") ?? 0, "trim part")}${str(d, "model") ? ` for the ${str(d, "model")}` : ""} in lot ${str(d, "lot")}${str(d, "supplier") ? ` from ${str(d, "supplier")}` : ""}`),
  "unit.response_measured": (d) => {
    const from = num(d, "fromHz");
    const to = num(d, "toHz");
    const points = num(d, "points");
    return `measured a response${points !== null ? ` of ${plural(points, "point")}` : ""}${from !== null && to !== null ? ` from ${formatHz(from)} to ${formatHz(to)}` : ""}`;
  },
  "unit.ts_measured": (d) => `measured Thiele–Small parameters${tsFigures(d) ? `: ${tsFigures(d)}` : ""}`,
  "set.matched": needs(["left", "right"], (d) => {
    const max = num(d, "maxDiffDb");
    const limit = num(d, "limitDb");
    const figure = max !== null ? `: ${formatDb(max)} dB apart at most${limit !== null ? `, limit ${formatDb(limit)} dB` : ""}` : "";
    return `matched ${str(d, "left")} with ${str(d, "right")}${figure}`;
  }),
  "set.member_fitted": needs(["unit", "speaker"], (d) => `fitted ${str(d, "unit")} into ${placeWords(str(d, "speaker"), str(d, "position"))}`),
  "route.started": (d) => `started the cabinet route${num(d, "specVersion") !== null ? ` (route version ${num(d, "specVersion")})` : ""}`,
  "route.step_recorded": needs(["step"], (d) => {
    const side = str(d, "side");
    const out = list(d, "outOfWindow").length;
    return `recorded step ${num(d, "seq") ?? ""}, ${str(d, "step").toLowerCase()}${isSide(side) ? `, for the ${sideWord(side)} cabinet` : ""}${out ? ` (${plural(out, "reading")} out of window)` : ""}`;
  }),
  "route.step_corrected": needs(["step"], (d) => {
    const changed = list(d, "changed").filter((k): k is string => typeof k === "string");
    const what = str(d, "changedWords") || (changed.length ? plural(changed.length, "reading") : "the record");
    return `corrected step ${num(d, "seq") ?? ""}, ${str(d, "step").toLowerCase()}: ${what}`;
  }),
  "nc.opened": needs(["code"], (d) => {
    const seq = num(d, "seq");
    return `opened nonconformance ${str(d, "code")}${seq !== null ? ` ${ncWhere(seq, str(d, "step") || null)}` : ""}: ${str(d, "finding")}`;
  }),
  "nc.dispositioned": needs(["code", "disposition"], (d) => {
    const disposition = str(d, "disposition");
    if (!DISPOSITIONS.includes(disposition)) return `decided nonconformance ${str(d, "code")}`;
    // Rework "back to" seq 0 is the final pair test's: adjust and test again.
    const phrase = dispositionPhrase({ disposition: disposition as Disposition, reworkToSeq: num(d, "reworkToSeq"), scrapped: str(d, "scrapped") ? { side: null, identity: str(d, "scrapped") } : null });
    return `decided nonconformance ${str(d, "code")}: ${phrase}`;
  }),
  "containment.raised": needs(["code", "target"], (d) => `raised containment ${str(d, "code")} on ${str(d, "target")}${num(d, "affected") !== null ? `: ${plural(num(d, "affected")!, "serial")} affected` : ""}`),
  "containment.inspected": needs(["code", "serial"], (d) => {
    const result = str(d, "result") === "failed" ? "failed" : "passed";
    return `inspected ${str(d, "serial")} for containment ${str(d, "code")}: it ${result}${str(d, "case") ? `, and service case ${str(d, "case")} was opened` : ""}`;
  }),
  "containment.released": needs(["code", "serial"], (d) => `released ${str(d, "serial")} from containment ${str(d, "code")}${str(d, "to") === "replaced" ? ": it was replaced" : ": cleared"}`),
  "containment.notified": needs(["code"], (d) => `sent ${str(d, "dealer") ? `dealer ${str(d, "dealer")}` : "an owner"} the notice of containment ${str(d, "code")}${num(d, "serials") !== null ? ` (${plural(num(d, "serials")!, "serial")})` : ""}`),
  "containment.closed": needs(["code"], (d) => `closed containment ${str(d, "code")}`),
  "spec.created": needs(["model"], (d) => `saved version ${num(d, "version") ?? ""} of the ${str(d, "model")} route${num(d, "steps") !== null ? ` (${plural(num(d, "steps")!, "step")})` : ""}`),
  "crossover.built": (d) => {
    const reasons = list(d, "reasons").map(String);
    if (d.pass === false) return `built the crossover board: it failed its checks${reasons.length ? ` (${reasons.join("; ")})` : ""}`;
    return d.pass === true ? "built the crossover board: it passed its checks" : "built the crossover board";
  },
  "pair.assembled": needs(["left", "right"], (d) => `built the pair's speakers: ${str(d, "left")} on the left, ${str(d, "right")} on the right`),
  "pair.inspected": () => "did the final clean and inspection",
  "pair.lacquer_paired": needs(["left", "right"], (d) => `paired lacquer cabinets ${str(d, "left")} and ${str(d, "right")}${str(d, "colour") ? ` (${str(d, "colour")})` : ""}`),
  "pair.final_tested": (d) => {
    const max = num(d, "maxDiffDb");
    const limit = num(d, "limitDb");
    const figure = max !== null ? `: largest difference ${formatDb(max)} dB${str(d, "worstBand") ? ` at ${bandLabel(str(d, "worstBand"))}` : ""}${limit !== null ? `, limit ${formatDb(limit)} dB` : ""}` : "";
    return `${d.pass ? "passed" : "failed"} the final pair test${figure}`;
  },
  "pair.packed": (d) => `packed the pair${str(d, "carton") ? ` into carton ${str(d, "carton")}` : ""}${str(d, "location") ? `, stored at ${str(d, "location")}` : ""}`,
  "pair.shipped": (d, ctx) => `shipped the pair${str(d, "carton") ? ` in carton ${str(d, "carton")}` : ""} to ${dealer(d, ctx)}${str(d, "shipment") ? ` in shipment ${str(d, "shipment")}` : ""}`,
  "certificate.issued": () => "issued the pair's certificate",
  "certificate.printed": (d) => (d.copy ? "printed a copy of the certificate" : "printed the certificate"),
  "carton.stored": (d) => `stored the carton${str(d, "location") ? ` at ${str(d, "location")}` : ""}`,
  "carton.moved": needs(["location"], (d) => `moved the carton${str(d, "from") ? ` from ${str(d, "from")}` : ""} to ${str(d, "location")}`),
  "shipment.dispatched": needs(["identity"], (d, ctx) => {
    const cartons = list(d, "cartons").length;
    const how = [str(d, "carrier") ? `with ${str(d, "carrier")}` : "", str(d, "tracking") ? `tracking ${str(d, "tracking")}` : ""].filter(Boolean).join(", ");
    return `dispatched shipment ${str(d, "identity")} to ${dealer(d, ctx)}${cartons ? `: ${plural(cartons, "carton")}` : ""}${how ? `, ${how}` : ""}${str(d, "shippedOn") ? `, left on ${day(str(d, "shippedOn"))}` : ""}`;
  }),
  "machine_token.created": (d) => `created the machine token${str(d, "name") ? ` ${str(d, "name")}` : ""}`,
  "machine_token.revoked": (d) => `revoked the machine token${str(d, "name") ? ` ${str(d, "name")}` : ""}`,
  "case.opened": (d) => `opened ${caseName(d)}${str(d, "serial") ? ` for ${str(d, "serial")}` : ""}`,
  "case.moved": needs(["from", "to"], (d) => `moved ${caseName(d)} from ${caseStateWords(str(d, "from"))} to ${caseStateWords(str(d, "to"))}`),
  "case.finding_recorded": needs(["side", "position"], (d) => `found ${str(d, "finding") || "a fault"} at the ${str(d, "side") === "R" ? "right" : "left"} speaker's ${positionName(str(d, "position"))}`),
  "case.file_added": (d) => `added ${str(d, "name") || "a file"} to ${caseName(d)}`,
  "case.part_reserved": (d) => `reserved ${str(d, "serial") || "a part"} for ${caseName(d)}`,
  "case.reservation_released": (d) => `released ${str(d, "serial") || "a reserved part"} from ${caseName(d)}`,
  "case.retested": (d) => `re-tested the pair of ${caseName(d)}${d.pass === true ? ": passed" : d.pass === false ? ": failed" : ""}`,
  "case.quoted": (d) => `quoted ${caseName(d)}`,
  "case.sent_back": (d) => `sent the speaker of ${caseName(d)} back`,
  "certificate.revised": (d) => {
    const n = str(d, "revision") || (num(d, "revision") !== null ? String(num(d, "revision")) : "");
    return n ? `issued revision ${n} of the certificate` : "issued a revised certificate";
  },
  "payment.requested": (d) => `sent a payment link for ${caseName(d)}`,
  "payment.received": (d) => `recorded a payment for ${caseName(d)}`,
  "payment.refunded": (d) => `refunded the payment of ${caseName(d)}`,
  "owner.consent_recorded": (d) => (d.consent === false ? "recorded that the owner does not wish to be contacted" : "recorded the owner's consent to be contacted"),
};

/** A short sentence for an event; a type recorded before the vocabulary existed gets its nearest words. */
export function describeEvent(type: string, data: Data = {}, ctx: DescribeContext = {}): string {
  if (!isEventType(type)) return `recorded ${type.replace(/[._]/g, " ")}`;
  try {
    return SENTENCES[type](data ?? {}, ctx) ?? EVENT_PHRASES[type];
  } catch {
    // Data written by an older version in another shape: the plain phrase is still true.
    return EVENT_PHRASES[type];
  }
}

/** What an event is about, for people: a serial (shown as a link), or a name, or a code. */
export interface SubjectWords {
  /** "Pair", "User", "Model"… */
  kind: string;
  /** The serial, name or code; null when the register holds nothing for it. */
  name: string | null;
  /** Set for items: the serial, to link to its page. */
  serial: string | null;
}

const SUBJECT_KIND_WORD: Record<string, string> = {
  user: "User",
  model: "Model",
  finish: "Finish",
  dealer: "Dealer",
  batch: "Batch",
  set: "Matched set",
  machine_token: "Machine token",
};

/**
 * Names an event's subject from what recentEvents joined (serial, name or code); failing that, a
 * name the event's own data carries. Never the internal id.
 */
export function subjectWords(e: { subjectKind: string; data: Data; subjectName?: string | null; subjectItemKind?: string | null }): SubjectWords {
  const d = e.data ?? {};
  if (e.subjectKind === "item") {
    const kind = e.subjectItemKind ?? "";
    const serial = e.subjectName ?? (str(d, "identity") || str(d, "child") || null);
    return { kind: isItemKind(kind) ? KIND_WORD[kind].replace(/^./, (c) => c.toUpperCase()) : "Item", name: serial, serial };
  }
  const fallback = [d.name, d.code, d.email].find((v): v is string => typeof v === "string" && v.length > 0) ?? null;
  return { kind: SUBJECT_KIND_WORD[e.subjectKind] ?? e.subjectKind.replace(/_/g, " "), name: e.subjectName ?? fallback, serial: null };
}

/** The subject as plain text: "Carton K-PW2-26-00041-X", "User Ann Webb". */
export function subjectLabel(e: Parameters<typeof subjectWords>[0]): string {
  const w = subjectWords(e);
  return w.name ? `${w.kind} ${w.name}` : `${w.kind} (no longer in the register)`;
}
