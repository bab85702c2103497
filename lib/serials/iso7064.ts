/**
 * ISO/IEC 7064 MOD 37-2: the pure system with modulus 37 and radix 2 over the alphabet 0-9 A-Z,
 * whose check character may also be `*` (value 36). It catches every single substitution and
 * every adjacent transposition, which is why serials carry it.
 */

export const MOD37_ALPHABET = "0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZ*";
const MODULUS = 37;
const RADIX = 2;

/** Value of one body character (0-9 → 0-9, A-Z → 10-35), or -1 when it is not in the body alphabet. */
export function mod37Value(ch: string): number {
  const v = MOD37_ALPHABET.indexOf(ch);
  return ch.length === 1 && v >= 0 && v < 36 ? v : -1;
}

/** The check character of `body` (0-9, A-Z only; upper case). */
export function mod37_2Check(body: string): string {
  if (body.length === 0) throw new Error("MOD 37-2: the body is empty");
  // The standard's recursive form: P₀ = 0, Pⱼ = (Pⱼ₋₁ + aⱼ) · r mod M, then the check c makes
  // Pₙ + c ≡ 1 (mod M).
  let p = 0;
  for (let i = 0; i < body.length; i++) {
    const v = mod37Value(body[i]!);
    if (v < 0) {
      throw new Error(`MOD 37-2: "${body[i]}" at position ${i + 1} of "${body}" is not one of 0-9 A-Z`);
    }
    p = ((p + v) * RADIX) % MODULUS;
  }
  return MOD37_ALPHABET[(MODULUS + 1 - p) % MODULUS]!;
}

/** True when the last character of `bodyWithCheck` is the MOD 37-2 check of the rest; false for any malformed input. */
export function isValidMod37_2(bodyWithCheck: string): boolean {
  if (bodyWithCheck.length < 2) return false;
  const body = bodyWithCheck.slice(0, -1);
  for (const ch of body) if (mod37Value(ch) < 0) return false;
  return mod37_2Check(body) === bodyWithCheck.slice(-1);
}
