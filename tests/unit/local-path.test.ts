import { describe, expect, test } from "vitest";
import { LOCAL_PATH_MAX, localPath, withQuery } from "@/lib/input/local-path";

// Every untrusted "where to go next" must land on Twinleaf's own origin (OWASP Cheat Sheet:
// Unvalidated Redirects and Forwards). The hostile variants rely on WHATWG URL parsing (URL
// Standard §4.4): tabs and newlines are removed, "\" is read as "/" in special schemes, "%2e%2e"
// is a ".." segment, and a path starting "//" is read by the browser as another host.
const HOSTILE: [string, unknown][] = [
  ["protocol-relative", "//evil.example"],
  ["protocol-relative with path", "//evil.example/x"],
  ["three slashes", "///evil.example"],
  ["backslash after slash", "/\\evil.example"],
  ["two backslashes", "\\\\evil.example"],
  ["dot then double slash", "/.//evil.example"],
  ["dot dot then double slash", "/..//evil.example"],
  ["encoded dot dot", "/%2e%2e//evil.example"],
  ["encoded dot dot, upper case", "/%2E%2E//evil.example"],
  ["mixed encoded dots", "/.%2e//evil.example"],
  ["encoded single dot", "/%2e//evil.example"],
  ["encoded slashes", "/%2F%2Fevil.example"],
  ["encoded slashes, lower case", "/%2f%2fevil.example"],
  ["encoded backslash", "/%5Cevil.example"],
  ["encoded backslash after slash", "/%5C%5Cevil.example"],
  ["segments up to root then double slash", "/a/../..//evil.example"],
  ["tab between slashes", "/\t/evil.example"],
  ["newline between slashes", "/\n/evil.example"],
  ["carriage return between slashes", "/\r/evil.example"],
  ["encoded tab", "/%09/evil.example"],
  ["encoded newline", "/%0a/evil.example"],
  ["encoded NUL", "/lab%00"],
  ["space before", " /lab"],
  ["leading space then slashes", " //evil.example"],
  ["javascript scheme", "javascript:alert(1)"],
  ["JavaScript scheme, mixed case", "JaVaScRiPt:alert(1)"],
  ["data URL", "data:text/html,<script>alert(1)</script>"],
  ["absolute https", "https://evil.example/"],
  ["absolute http, upper case", "HTTP://evil.example/"],
  ["scheme-relative with credentials", "//user@evil.example"],
  ["no leading slash", "lab"],
  ["relative dot", "./lab"],
  ["empty", ""],
  ["not text: undefined", undefined],
  ["not text: array", ["/lab", "//evil.example"]],
  ["not text: number", 42],
  ["broken escape", "/lab/%zz"],
  ["lone percent", "/lab/%"],
  ["overlong UTF-8 slash", "/%C0%AF/evil.example"],
  ["non-ASCII letter", "/läb"],
  ["full-width solidus", "/\uff0f/evil.example"],
  ["over-long", `/${"a".repeat(LOCAL_PATH_MAX)}`],
];

describe("localPath refuses every way off the site", () => {
  test.each(HOSTILE)("%s", (_name, input) => {
    expect(localPath(input)).toBeNull();
  });
});

// Plain paths of Twinleaf come back as they are (the URL Standard keeps them unchanged).
describe("localPath keeps Twinleaf's own paths", () => {
  test.each([
    ["/", "/"],
    ["/admin/users", "/admin/users"],
    ["/lab?batch=7#top", "/lab?batch=7#top"],
    ["/cabinet/pairs/P-PW2-26-00042-Q?station=press", "/cabinet/pairs/P-PW2-26-00042-Q?station=press"],
    ["/register/items/S%2F1", "/register/items/S%2F1"],
    // Dot segments that stay on the site are resolved the way a browser would (URL Standard).
    ["/lab/../quality", "/quality"],
    ["/lab/./batches", "/lab/batches"],
    ["/lab/%2e%2e/quality", "/quality"],
  ])("%j → %j", (input, expected) => {
    expect(localPath(input)).toBe(expected);
  });

  test("what it answers, read again, is the same (a fixed point)", () => {
    for (const p of ["/lab/../quality", "/a/b/./c?x=1#y", "/register/items/S%2F1"]) {
      const once = localPath(p);
      expect(once).not.toBeNull();
      expect(localPath(once)).toBe(once);
    }
  });
});

describe("withQuery builds only on a local path", () => {
  test.each([
    ["/quality", "/quality?dispositioned=NC-1"],
    ["/lab?x=1#t", "/lab?x=1&dispositioned=NC-1#t"],
    ["//evil.example", null],
    ["/.//evil.example", null],
  ])("%j → %j", (path, expected) => {
    expect(withQuery(path, "dispositioned", "NC-1")).toBe(expected);
  });
});
