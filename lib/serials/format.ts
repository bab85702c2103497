/**
 * The register's serials: `{letter}-{code}-{YY}-{seq}-{check}`, e.g. `P-PW2-26-00042-?`, where
 * the check is the ISO/IEC 7064 MOD 37-2 character of the body with the hyphens removed.
 * A veneer leaf is its flitch's serial + `/` + a two-digit leaf number.
 */
import type { PartType } from "@/lib/vocabulary/part-types";
import type { ItemKind } from "@/db/schema/genealogy";
import { mod37_2Check } from "./iso7064";

export const SERIAL_KIND_LETTERS = {
  cabinet: "C",
  drive_unit: "D",
  crossover: "X",
  speaker: "S",
  pair: "P",
  carton: "K",
  shipment: "H",
  flitch: "F",
  trim_part: "T",
} as const satisfies Partial<Record<ItemKind, string>>;
export type SerialKind = keyof typeof SERIAL_KIND_LETTERS;

/** The code a drive unit's serial carries instead of a model code. */
export const PART_TYPE_CODES = { tweeter: "TW", midrange: "MR", bass: "BS" } as const satisfies Record<PartType, string>;
export type { PartType };

const KIND_BY_LETTER = new Map<string, SerialKind>(
  Object.entries(SERIAL_KIND_LETTERS).map(([kind, letter]) => [letter, kind as SerialKind]),
);
const PART_CODES = new Set<string>(Object.values(PART_TYPE_CODES));

const CODE = /^[A-Z0-9]{2,4}$/;
const SEQ_MIN_WIDTH = 5;
/** Nine digits keeps a carton serial within GS1's 20 characters for (21) and parsing bounded. */
export const SEQ_MAX = 999_999_999;

export interface SerialParts {
  kind: SerialKind;
  /** Model code; part-type code for drive units; dealer code for shipments; finish code for flitches. */
  code: string;
  /** Calendar year, 2000–2099 (printed as two digits). */
  year: number;
  seq: number;
}

export interface ParsedSerial extends SerialParts {
  check: string;
  /** Canonical form with the check character as read (which may be wrong). */
  canonical: string;
  /** The check character fits the body. */
  valid: boolean;
}

const padSeq = (seq: number) => String(seq).padStart(SEQ_MIN_WIDTH, "0");
const compactBody = (letter: string, code: string, year: number, seq: number) =>
  `${letter}${code}${String(year % 100).padStart(2, "0")}${padSeq(seq)}`;

export function formatSerial({ kind, code, year, seq }: SerialParts): string {
  const letter = SERIAL_KIND_LETTERS[kind];
  if (!letter) throw new Error(`Serial: "${kind}" is not a serialised kind`);
  if (!CODE.test(code)) throw new Error(`Serial: code "${code}" must be 2 to 4 of A-Z 0-9`);
  if (kind === "drive_unit" && !PART_CODES.has(code)) {
    throw new Error(`Serial: a drive unit's code is its part type (${[...PART_CODES].join(", ")}), not "${code}"`);
  }
  if (!Number.isInteger(year) || year < 2000 || year > 2099) throw new Error(`Serial: year ${year} must be 2000–2099`);
  if (!Number.isInteger(seq) || seq < 1 || seq > SEQ_MAX) throw new Error(`Serial: sequence number ${seq} must be 1–${SEQ_MAX}`);
  const body = compactBody(letter, code, year, seq);
  return `${letter}-${code}-${body.slice(1 + code.length, 3 + code.length)}-${padSeq(seq)}-${mod37_2Check(body)}`;
}

/**
 * What a scanner or keyboard gave, made comparable: control characters (CR/LF/TAB suffixes,
 * STX/ETX framing, GS) removed, surrounding space trimmed, upper case.
 */
export function normaliseScan(text: string): string {
  return text.replace(/[\u0000-\u001f\u007f-\u009f]/g, "").trim().toUpperCase();
}

interface RawParts {
  letter: string;
  code: string;
  yy: string;
  seq: string;
  check: string;
}

/**
 * One reading of the five fields. `strictSeq` demands the canonical width (5 digits, or more
 * without a leading zero): a reading inferred from a separator-less string must be exact,
 * since the check covers the padded digits; typed fields may leave the zeros off.
 */
function readParts(p: RawParts, strictSeq: boolean): ParsedSerial | null {
  const kind = KIND_BY_LETTER.get(p.letter);
  if (!kind || !CODE.test(p.code) || !/^[0-9]{2}$/.test(p.yy) || !/^[0-9A-Z*]$/.test(p.check)) return null;
  if (kind === "drive_unit" && !PART_CODES.has(p.code)) return null;
  const seqShape = strictSeq ? /^(?:[0-9]{5}|[1-9][0-9]{5,8})$/ : /^[0-9]{1,9}$/;
  if (!seqShape.test(p.seq)) return null;
  const seq = Number(p.seq);
  if (seq < 1) return null;
  const year = 2000 + Number(p.yy);
  const body = compactBody(p.letter, p.code, year, seq);
  const expected = mod37_2Check(body);
  return {
    kind,
    code: p.code,
    year,
    seq,
    check: p.check,
    canonical: `${p.letter}-${p.code}-${p.yy}-${padSeq(seq)}-${p.check}`,
    valid: expected === p.check,
  };
}

/**
 * The separator-less string `compact` (body and check) read with a code `codeLength` long, or
 * null when that reading is not exactly a canonical serial's characters.
 */
export function readCompact(compact: string, codeLength: number): ParsedSerial | null {
  const parts = {
    letter: compact.slice(0, 1),
    code: compact.slice(1, 1 + codeLength),
    yy: compact.slice(1 + codeLength, 3 + codeLength),
    seq: compact.slice(3 + codeLength, -1),
    check: compact.slice(-1),
  };
  return readParts(parts, true);
}

/** `text` normalised and cut at its separators (hyphens, spaces), with where the cuts fell in the joined characters. */
export function splitAtSeparators(text: string): { parts: string[]; compact: string; cuts: number[] } {
  const parts = normaliseScan(text).split(/[\s-]+/).filter(Boolean);
  const cuts: number[] = [];
  let at = 0;
  for (const part of parts.slice(0, -1)) cuts.push((at += part.length));
  return { parts, compact: parts.join(""), cuts };
}

/**
 * The code lengths (4, 3, 2) under which `compact` has a 5–9 character sequence and every cut
 * the person typed falls between two fields: a missing separator is forgiven, one inside a
 * field is not.
 */
export function codeLengthsFitting(compact: string, cuts: number[]): number[] {
  const lengths: number[] = [];
  for (let codeLength = 4; codeLength >= 2; codeLength--) {
    const seqLength = compact.length - 4 - codeLength;
    if (seqLength < SEQ_MIN_WIDTH || seqLength > 9) continue;
    const bounds = [1, 1 + codeLength, 3 + codeLength, compact.length - 1];
    if (cuts.every((c) => bounds.includes(c))) lengths.push(codeLength);
  }
  return lengths;
}

/**
 * Every well-shaped reading of `text`, best first. Typed with all four separators there is one;
 * with fewer, the variable-length code can allow several: readings whose check fits come first,
 * then the narrowest sequence (a 5-digit one). The check covers the body without hyphens, so it
 * cannot tell the readings of one string apart; a caller that can should look each up.
 */
export function serialReadings(text: string): ParsedSerial[] {
  const { parts, compact, cuts } = splitAtSeparators(text);
  if (parts.length === 5) {
    const [letter, code, yy, seq, check] = parts as [string, string, string, string, string];
    const reading = readParts({ letter, code, yy, seq, check }, false);
    if (reading) return [reading];
  }
  const readings = codeLengthsFitting(compact, cuts)
    .map((codeLength) => readCompact(compact, codeLength))
    .filter((r): r is ParsedSerial => r !== null);
  // Stable sort: among equals the longest code (narrowest sequence) stays first.
  return readings.sort((a, b) => Number(b.valid) - Number(a.valid));
}

/** The best reading of `text` as a serial, or null when it is not shaped like one. */
export function parseSerial(text: string): ParsedSerial | null {
  return serialReadings(text)[0] ?? null;
}

export const LEAF_MAX = 99;

export function leafIdentity(flitchSerial: string, leafNo: number): string {
  const flitch = parseSerial(flitchSerial);
  if (!flitch || flitch.kind !== "flitch") throw new Error(`Leaf: "${flitchSerial}" is not a flitch serial`);
  if (!flitch.valid) throw new Error(`Leaf: flitch serial "${flitchSerial}" has a check character that does not fit`);
  if (!Number.isInteger(leafNo) || leafNo < 1 || leafNo > LEAF_MAX) throw new Error(`Leaf: leaf number ${leafNo} must be 1–${LEAF_MAX}`);
  return `${flitch.canonical}/${String(leafNo).padStart(2, "0")}`;
}

export interface ParsedLeafIdentity {
  flitch: ParsedSerial;
  leafNo: number;
  canonical: string;
  /** The flitch serial's check character fits (the leaf number has none of its own). */
  valid: boolean;
}

export function parseLeafIdentity(text: string): ParsedLeafIdentity | null {
  const t = normaliseScan(text);
  const slash = t.indexOf("/");
  if (slash < 0 || t.indexOf("/", slash + 1) >= 0) return null;
  const flitch = parseSerial(t.slice(0, slash));
  const leafText = t.slice(slash + 1).trim();
  if (!flitch || flitch.kind !== "flitch" || !/^[0-9]{1,2}$/.test(leafText)) return null;
  const leafNo = Number(leafText);
  if (leafNo < 1) return null;
  return { flitch, leafNo, canonical: `${flitch.canonical}/${String(leafNo).padStart(2, "0")}`, valid: flitch.valid };
}
