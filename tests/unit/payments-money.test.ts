/**
 * Money in minor units. Exponents are ISO 4217's "minor unit" column (ISO 4217:2015, list one, as
 * published by its maintenance agency); Twinleaf reads them from Intl, so these rows check Node's
 * ICU against the standard. Signatures are checked by the provider's own SDK (`stripe`), an
 * independent library: the stand-in's signing must be what the SDK accepts.
 */
import Stripe from "stripe";
import { describe, expect, test } from "vitest";
import { currencyOf, formatMoney, minorToPlain, parseMoney, totalMinor, workshopCurrency } from "@/lib/payments/money";
import { apiBase } from "@/lib/payments/provider";
import { parseProviderForm, signPayload } from "@/lib/payments/stand-in";

describe("a currency's minor unit", () => {
  test.each([
    // ISO 4217, list one, minor unit column:
    ["EUR", 2],
    ["GBP", 2],
    ["USD", 2],
    ["CHF", 2],
    ["JPY", 0],
    ["KRW", 0],
    ["ISK", 0],
    ["BHD", 3],
    ["KWD", 3],
    ["jpy", 0], // lower case is read as the same code
  ])("%s has %i decimal places (ISO 4217)", (code, exponent) => {
    expect(currencyOf(code)).toEqual({ code: code.toUpperCase(), exponent });
  });

  test.each([["ABC"], ["EURO"], ["€"], [""], ["12A"]])("%s is no ISO 4217 code", (code) => {
    expect(currencyOf(code)).toBeNull();
  });

  test.each([
    [{}, "EUR"], // the default the brief sets
    [{ TWINLEAF_CURRENCY: "gbp" }, "GBP"],
    [{ TWINLEAF_CURRENCY: " JPY " }, "JPY"],
  ])("TWINLEAF_CURRENCY %o is %s", (env, code) => {
    expect(workshopCurrency(env).code).toBe(code);
  });

  test("an unknown TWINLEAF_CURRENCY stops with a message naming the setting", () => {
    expect(() => workshopCurrency({ TWINLEAF_CURRENCY: "XYZ1" })).toThrow(/TWINLEAF_CURRENCY/);
  });
});

const EUR = { code: "EUR", exponent: 2 };
const JPY = { code: "JPY", exponent: 0 };
const BHD = { code: "BHD", exponent: 3 };

describe("typed prices", () => {
  // Expected minor units: the typed amount × 10^exponent, exponents from ISO 4217 above.
  test.each([
    ["120", EUR, 12000],
    ["120.50", EUR, 12050],
    ["120,50", EUR, 12050],
    ["120.5", EUR, 12050],
    ["0.01", EUR, 1],
    ["007", EUR, 700],
    [" 45 ", EUR, 4500],
    ["1 200.50", EUR, 120050],
    ["1 234 567", EUR, 123456700],
    ["1200", JPY, 1200],
    ["12.345", BHD, 12345],
    ["0.10", EUR, 10], // 0.1 + 0.2 style float sums never happen: digits are joined as text
  ])("%j in %o is %i minor units", (typed, currency, minor) => {
    expect(parseMoney(typed, currency)).toEqual({ ok: true, minor });
  });

  test.each([
    ["1e3", EUR, /not a price/],
    ["12.505", EUR, /2 decimal places at most/],
    ["12.5", JPY, /no smaller unit/],
    ["12.3456", BHD, /3 decimal places at most/],
    ["-5", EUR, /not a price/],
    ["+5", EUR, /not a price/],
    ["€5", EUR, /not a price/],
    ["5 EUR", EUR, /not a price/],
    ["1,200.50", EUR, /not a price/],
    ["1.200,50", EUR, /not a price/],
    ["12 00", EUR, /not a price/],
    ["0x10", EUR, /not a price/],
    ["Infinity", EUR, /not a price/],
    ["NaN", EUR, /not a price/],
    ["", EUR, /Give a price/],
    ["12.", EUR, /not a price/],
    [".5", EUR, /not a price/],
    ["999999999999", EUR, /more than/],
  ])("%j in %o is refused", (typed, currency, message) => {
    const r = parseMoney(typed, currency);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.message).toMatch(message);
  });
});

describe("amounts shown", () => {
  test.each([
    [12050, EUR, "120.50", "€120.50"],
    [5, EUR, "0.05", "€0.05"],
    [1200, JPY, "1200", "JP¥1,200"],
    [12345, BHD, "12.345", "BHD\u00a012.345"],
  ])("%i minor units of %o read %s, shown %s (en-GB conventions, CLDR)", (minor, currency, plain, shown) => {
    expect(minorToPlain(minor, currency)).toBe(plain);
    expect(formatMoney(minor, currency)).toBe(shown);
  });

  test.each([
    [[{ quantity: 1, unitMinor: 12050 }, { quantity: 2, unitMinor: 4500 }], 21050], // 120.50 + 2 × 45.00
    [[{ quantity: 3, unitMinor: 10 }, { quantity: 1, unitMinor: 20 }], 50], // 0.30 + 0.20, exact
  ])("the total of %j is %i", (lines, total) => {
    expect(totalMinor(lines)).toBe(total);
  });
});

describe("the stand-in speaks the provider's formats", () => {
  const sdk = new Stripe("sk_test_unit");
  test.each([
    ["a payload", "whsec_one", 1_700_000_000],
    ['{"id":"evt_1","type":"checkout.session.completed"}', "whsec_two", 1_800_000_000],
  ])("its signature of %j is the one the SDK makes and accepts", (payload, secret, t) => {
    const ours = signPayload(payload, secret, t);
    expect(ours).toBe(sdk.webhooks.generateTestHeaderString({ payload, secret, timestamp: t }));
    expect(sdk.webhooks.signature!.verifyHeader(payload, ours, secret, 300, undefined, t + 10)).toBe(true);
  });

  test("it reads the SDK's form encoding of nested objects and arrays", () => {
    const body = "mode=payment&line_items[0][quantity]=2&line_items[0][price_data][unit_amount]=4500&metadata[caseId]=c1&__proto__[x]=1";
    expect(parseProviderForm(body)).toEqual({ mode: "payment", line_items: { "0": { quantity: "2", price_data: { unit_amount: "4500" } } }, metadata: { caseId: "c1" } });
    expect(({} as Record<string, unknown>).x).toBeUndefined();
  });

  test.each([
    ["http://127.0.0.1:12111", { host: "127.0.0.1", port: 12111, protocol: "http" }],
    ["https://payments.example.test", { host: "payments.example.test", port: 443, protocol: "https" }],
    ["", undefined],
  ])("STRIPE_API_BASE %j is the SDK's %o", (base, expected) => {
    expect(apiBase(base)).toEqual(expected);
  });
});
