import { describe, expect, test } from "vitest";
import { z } from "zod";
import { echoPlan, echoValues, secret } from "@/lib/forms";
import { calendarDate, isCalendarDate } from "@/lib/input/dates";
import { EMAIL_MAX, isEmailAddress } from "@/lib/input/email";
import { readMeasure, readWholeNumber, wholeNumber } from "@/lib/input/numbers";
import { momentParam } from "@/lib/genealogy/moment";
import { formatSize } from "@/lib/input/sizes";

// Whole numbers: decimal digits only (common practice on shop-floor forms). Each refused form is one
// JavaScript's Number() accepts (ECMA-262 §7.1.4.1.1 StringToNumber: hex, binary, octal, exponents,
// Infinity, a leading sign, surrounding white space), which is why Number() is not used.
describe("readWholeNumber", () => {
  test.each([
    ["16", 16],
    [" 24 ", 24],
    ["0", 0],
    ["007", 7],
    ["0x10", null],
    ["0b11", null],
    ["0o17", null],
    ["1e3", null],
    ["+5", null],
    ["-5", null],
    ["2.0", null],
    ["1,000", null],
    ["Infinity", null],
    ["", null],
    ["1 2", null],
    ["９", null], // full-width digit
    ["9007199254740993", null], // beyond Number.MAX_SAFE_INTEGER (ECMA-262 §21.1.2.6)
  ])("%j → %j", (text, expected) => {
    expect(readWholeNumber(text)).toBe(expected);
  });
});

// Measures: a decimal point or comma (ISO 80000-1 §7.3.1 allows either as the decimal sign).
describe("readMeasure", () => {
  test.each([
    ["137", 137],
    ["137.5", 137.5],
    ["137,5", 137.5],
    ["-0,15", -0.15],
    ["\u22120.15", -0.15], // the typographic minus sign
    [".5", 0.5],
    ["0x10", null],
    ["1e3", null],
    ["1.2.3", null],
    ["1,5,0", null],
    ["+2", null],
    ["NaN", null],
    ["-Infinity", null],
    ["1 000", null],
  ])("%j → %j", (text, expected) => {
    expect(readMeasure(text)).toBe(expected);
  });

  test.each([
    ["0x10", false],
    ["16", true],
    ["", false],
  ])("wholeNumber(min 2) reads %j: accepted %s", (text, ok) => {
    expect(wholeNumber(z.number().int().min(2)).safeParse(text).success).toBe(ok);
  });
});

// The Gregorian calendar: 30 days hath September…; leap years by ISO 8601 / the Gregorian rule
// (divisible by 4, except centuries not divisible by 400).
describe("calendar dates", () => {
  test.each([
    ["2025-06-30", true],
    ["2024-02-29", true],
    ["2000-02-29", true],
    ["2025-02-30", false],
    ["2025-02-29", false],
    ["1900-02-29", false],
    ["2025-04-31", false],
    ["2025-13-01", false],
    ["2025-00-10", false],
    ["2025-6-30", false],
    ["30/06/2025", false],
    ["-1", false],
    ["2025-06-30T10:00:00Z", false],
  ])("%j is a calendar date: %s", (text, ok) => {
    expect(isCalendarDate(text)).toBe(ok);
  });

  test("a day that does not exist is named in the message", () => {
    const r = calendarDate().safeParse("2025-02-30");
    expect(r.success).toBe(false);
    expect(r.error?.issues[0]?.message).toBe("2025-02-30 is not a day on the calendar.");
  });
});

// The trace's moment: refused rather than rolled over (JavaScript's Date reads "-1" as 2001).
describe("the trace's moment", () => {
  test.each([
    ["now", true],
    ["built", true],
    ["ever", true],
    ["2025-06-30", true],
    ["2025-06-30T14:00:00Z", true],
    ["2025-06-30T14:00:00+02:00", true],
    ["2025-02-30", false],
    ["-1", false],
    ["0", false],
    ["June 30", false],
    ["2025-06-30T25:00:00Z", false],
  ])("%j accepted: %s", (text, ok) => {
    const r = momentParam.safeParse(text);
    expect(r.success).toBe(ok);
    if (!ok) expect(r.error?.issues[0]?.message).toMatch(/now, built, ever, a date such as 2025-06-30/);
  });
});

// RFC 5321 §4.5.3.1.1 (local part ≤ 64 octets), §4.5.3.1.3 (path ≤ 256 octets, so an address ≤ 254),
// RFC 1035 §2.3.4 (a label ≤ 63 octets).
describe("e-mail addresses", () => {
  const label63 = "d".repeat(63);
  const at254 = `${"a".repeat(64)}@${label63}.${label63}.${"e".repeat(58)}.te`;
  test.each([
    ["name@example.test", true],
    [at254, true],
    [`${at254}s`, false],
    [`${"a".repeat(65)}@example.test`, false],
    [`a@${"d".repeat(64)}.test`, false],
    ["no-at-sign.example.test", false],
    ["two@@example.test", false],
  ])("%#: accepted %s", (email, ok) => {
    expect(isEmailAddress(email)).toBe(ok);
  });
  test("the 254-character case is 254 characters", () => {
    expect(at254.length).toBe(EMAIL_MAX);
  });
});

// The echo allow-list: only declared, non-secret fields come back.
describe("echoValues", () => {
  const schema = z.object({ email: z.string(), note: z.string(), pin: secret(z.string()), password: z.string(), confirm: z.string() });
  test.each([
    [{ email: "a@b.test", note: "hi" }, { email: "a@b.test", note: "hi" }],
    [{ email: "a@b.test", pin: "1234" }, { email: "a@b.test" }],
    [{ password: "x", confirm: "y", token: "t", apiSecret: "s" }, {}],
    [{ undeclared: "z" }, {}],
  ])("%j → %j", (raw, expected) => {
    expect(echoValues(raw, echoPlan(schema))).toEqual(expected);
  });
  test("a refined object schema still has its fields", () => {
    expect([...echoPlan(schema.refine(() => true)).fields].sort()).toEqual(["email", "note"]);
  });
});

describe("formatSize", () => {
  test.each([
    [64 * 1024, "64 KB"],
    [3 * 1024 * 1024, "3 MB"],
    [1, "1 byte"],
  ])("%j → %j", (n, s) => {
    expect(formatSize(n)).toBe(s);
  });
});
