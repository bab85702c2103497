// Money as integers of a currency's minor unit (cents, pence, yen): never a float, so a sum of
// lines is exact and the provider receives the same integer the quote shows.
//
// A currency's minor-unit exponent comes from Intl (ICU's copy of the ISO 4217 table):
// `maximumFractionDigits` of a currency formatter. Node ships full ICU, so no package is needed.

export interface Currency {
  /** ISO 4217 code, upper case. */
  code: string;
  /** Digits after the decimal mark: 2 for EUR, GBP, USD; 0 for JPY; 3 for BHD. */
  exponent: number;
}

export const DEFAULT_CURRENCY = "EUR";

/** The largest amount a quote line or a total may hold, in minor units (well inside 2^53). */
export const MAX_MINOR = 99_999_999_99;

let known: Set<string> | null = null;

/** The currency of a code, or null when ISO 4217 (as Intl knows it) has no such currency. */
export function currencyOf(code: string): Currency | null {
  const c = code.trim().toUpperCase();
  if (!/^[A-Z]{3}$/.test(c)) return null;
  known ??= new Set(Intl.supportedValuesOf("currency"));
  if (!known.has(c)) return null;
  const exponent = new Intl.NumberFormat("en", { style: "currency", currency: c }).resolvedOptions().maximumFractionDigits;
  if (exponent === undefined) return null;
  return { code: c, exponent };
}

/** The workshop's currency: TWINLEAF_CURRENCY, or EUR. An unknown code is a setting slip, said at once. */
export function workshopCurrency(env: Record<string, string | undefined> = process.env): Currency {
  const raw = env.TWINLEAF_CURRENCY?.trim() || DEFAULT_CURRENCY;
  const c = currencyOf(raw);
  if (!c) throw new Error(`TWINLEAF_CURRENCY is "${raw}", which is not an ISO 4217 currency code (for example EUR, GBP, USD, JPY).`);
  return c;
}

export type ParsedMoney = { ok: true; minor: number } | { ok: false; message: string };

/**
 * A price typed by a person, in the currency's major unit: "120", "120.50", "120,50", "1 200.50".
 * Strict on purpose: no exponents ("1e3"), no signs, no more decimals than the currency has, no
 * thousands separators other than spaces (a "1,200" could be 1.2 or 1200).
 */
export function parseMoney(text: string, currency: Currency): ParsedMoney {
  const typed = text.trim();
  // Spaces may group thousands ("1 200.50"), and only in threes; nothing else is taken out.
  const t = /^\d{1,3}(?:[ \u00a0\u202f]\d{3})+(?:[.,]\d+)?$/.test(typed) ? typed.replace(/[ \u00a0\u202f]/g, "") : typed;
  if (t === "") return { ok: false, message: "Give a price." };
  const m = /^(\d+)(?:[.,](\d+))?$/.exec(t);
  if (!m) return { ok: false, message: `“${typed}” is not a price: write it like ${priceExample(currency)}, with no other signs.` };
  const [, whole, fraction = ""] = m as unknown as [string, string, string | undefined];
  if (fraction.length > currency.exponent) {
    return {
      ok: false,
      message:
        currency.exponent === 0
          ? `${currency.code} has no smaller unit: give a whole number, like ${priceExample(currency)}.`
          : `${currency.code} has ${currency.exponent} decimal places at most: write it like ${priceExample(currency)}.`,
    };
  }
  // Digits joined as text, then read once: no float ever holds the amount.
  const digits = (whole + fraction.padEnd(currency.exponent, "0")).replace(/^0+(?=\d)/, "");
  if (digits.length > String(MAX_MINOR).length || Number(digits) > MAX_MINOR) return { ok: false, message: `That is more than ${formatMoney(MAX_MINOR, currency)}.` };
  return { ok: true, minor: Number(digits) };
}

/** A price written the way parseMoney reads it, for hints: "120.50", "1200". */
export function priceExample(currency: Currency): string {
  return currency.exponent === 0 ? "1200" : `120.${"5".padEnd(currency.exponent, "0")}`;
}

/** Minor units as the major amount, e.g. 12050 EUR → "120.50", 1200 JPY → "1200": for inputs. */
export function minorToPlain(minor: number, currency: Currency): string {
  if (!Number.isSafeInteger(minor)) throw new RangeError(`an amount in minor units must be a whole number, got ${minor}`);
  if (currency.exponent === 0) return String(minor);
  const s = String(Math.abs(minor)).padStart(currency.exponent + 1, "0");
  return `${minor < 0 ? "-" : ""}${s.slice(0, -currency.exponent)}.${s.slice(-currency.exponent)}`;
}

/** Minor units for a person to read, with the currency: "€120.50", "¥1,200". */
export function formatMoney(minor: number, currency: Currency): string {
  // Intl reads a decimal string exactly ("120.50"), so the shown amount is the stored integer.
  const plain = minorToPlain(minor, currency);
  return new Intl.NumberFormat("en-GB", { style: "currency", currency: currency.code }).format(plain as unknown as number);
}

/** The exact sum of quantity × unit price over lines, refused past MAX_MINOR. */
export function totalMinor(lines: readonly { quantity: number; unitMinor: number }[]): number {
  let sum = 0;
  for (const l of lines) {
    if (!Number.isSafeInteger(l.quantity) || !Number.isSafeInteger(l.unitMinor)) throw new RangeError("quantities and prices are whole numbers");
    sum += l.quantity * l.unitMinor;
    if (sum > MAX_MINOR) throw new RangeError("the total is too large");
  }
  return sum;
}
