import { describe, expect, test } from "vitest";
import { safeNext } from "@/app/(auth)/schemas";

// What follows sign-in must stay on Twinleaf's own origin (OWASP: unvalidated redirects). The
// tricky inputs rely on WHATWG URL parsing, which strips tabs/newlines and treats "\" like "/".
describe("safeNext", () => {
  test.each([
    ["/admin/users", "/admin/users"],
    ["/lab?batch=7#top", "/lab?batch=7#top"],
    [undefined, "/"],
    ["", "/"],
    ["https://elsewhere.test/", "/"],
    ["//elsewhere.test/x", "/"],
    ["/\\elsewhere.test/x", "/"],
    ["/\t/elsewhere.test/x", "/"],
    ["/\n/elsewhere.test", "/"],
    ["javascript:alert(1)", "/"],
  ])("%j → %j", (input, expected) => {
    expect(safeNext(input)).toBe(expected);
  });
});

// The probe's own attack and its variants: the path is normalised by the browser after the check.
describe("safeNext after normalising", () => {
  test.each([["/.//evil.example"], ["/..//evil.example"], ["/%2e%2e//evil.example"], ["/%2F%2Fevil.example"], ["/a/../..//evil.example"]])("%j → /", (input) => {
    expect(safeNext(input)).toBe("/");
  });
});
