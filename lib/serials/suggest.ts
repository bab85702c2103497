/**
 * Serials one keying slip away from a serial whose check character does not fit. MOD 37-2 catches
 * every single substitution and adjacent transposition, so each such slip of a real serial leads
 * back to it here; the caller keeps the candidates that exist in the register.
 */
import { MOD37_ALPHABET } from "./iso7064";
import { codeLengthsFitting, readCompact, splitAtSeparators } from "./format";

const M = 37;
const mod = (n: number) => ((n % M) + M) % M;

/** 2^k mod 37 and its inverse: weights of the positions counted from the check (weight 1). */
const POW2: number[] = [];
const POW2_INVERSE: number[] = [];
for (let k = 0, w = 1; k < 36; k++, w = (w * 2) % M) POW2.push(w);
// 2 has order 36 mod 37, so 2^-k = 2^(36-k).
for (let k = 0; k < 36; k++) POW2_INVERSE.push(POW2[(36 - k) % 36]!);

interface Layout {
  /** Body and check with the hyphens removed, sequence zero-padded. */
  compact: string;
  codeLength: number;
}

/**
 * Where the fields of `text` lie: from its separators when it has five fields of plausible
 * length, else every code length that leaves a 5–9 character sequence. Characters need not be
 * in the right class (an O for a 0 is exactly the slip to repair).
 */
function layouts(text: string): Layout[] {
  const { parts, compact, cuts } = splitAtSeparators(text);
  if (parts.length === 0 || !parts.every((p) => /^[0-9A-Z*]+$/.test(p))) return [];
  if (parts.length === 5) {
    const [letter, code, yy, seq, check] = parts as [string, string, string, string, string];
    // Typed fields may leave the sequence's zeros off; the check covers them.
    const padded = /^[0-9]+$/.test(seq) ? seq.padStart(5, "0") : seq;
    if (letter.length === 1 && code.length >= 2 && code.length <= 4 && yy.length === 2 && padded.length >= 5 && padded.length <= 9 && check.length === 1) {
      return [{ compact: letter + code + yy + padded + check, codeLength: code.length }];
    }
  }
  return codeLengthsFitting(compact, cuts).map((codeLength) => ({ compact, codeLength }));
}

/**
 * Canonical serials one substitution (any of the 37 characters, body or check position) or one
 * adjacent transposition (hyphens ignored) away from `canonicalOrRaw` whose check fits and which
 * are shaped like serials. Empty when the input's check already fits (no slip leads from a valid
 * serial to another) or when it has no serial's shape.
 */
export function nearMisses(canonicalOrRaw: string): string[] {
  const out = new Set<string>();
  for (const { compact, codeLength } of layouts(canonicalOrRaw)) {
    const m = compact.length;
    const a = [...compact].map((ch) => MOD37_ALPHABET.indexOf(ch));
    const w = (k: number) => POW2[(m - 1 - k) % 36]!;
    // The pure system's condition: Σ aₖ·2^(m−1−k) ≡ 1 (mod 37), the check weighted 1. A slip
    // changes the sum by one term, so each candidate is tested without recomputing the rest.
    let sum = 0;
    for (let k = 0; k < m; k++) sum = mod(sum + a[k]! * w(k));
    const keep = (chars: string[]) => {
      // Shape (a * only as the check, digits where digits go) is readCompact's to judge.
      const reading = readCompact(chars.join(""), codeLength);
      if (reading?.valid) out.add(reading.canonical);
    };
    for (let k = 0; k < m; k++) {
      // The one value at k that brings the sum to 1.
      const v = mod(a[k]! + (1 - sum) * POW2_INVERSE[(m - 1 - k) % 36]!);
      if (v === a[k]) continue;
      const chars = [...compact];
      chars[k] = MOD37_ALPHABET[v]!;
      keep(chars);
    }
    for (let k = 0; k + 1 < m; k++) {
      if (a[k] === a[k + 1]) continue;
      if (mod(sum + (a[k + 1]! - a[k]!) * (w(k) - w(k + 1))) !== 1) continue;
      const chars = [...compact];
      [chars[k], chars[k + 1]] = [chars[k + 1]!, chars[k]!];
      keep(chars);
    }
  }
  return [...out];
}
