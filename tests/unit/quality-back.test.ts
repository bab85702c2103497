import { describe, expect, test } from "vitest";
import { dispositionSchema, isLocalPath, withQuery } from "@/app/(workshop)/quality/schemas";

// After a disposition the form returns to the page it was on, and only ever to a page of this site
// (OWASP: unvalidated redirects). The tricky inputs rely on WHATWG URL parsing, which strips tabs
// and newlines and reads "\" like "/", so "/\host" and "/\t/host" would leave the site.
describe("the disposition form's page to return to", () => {
  test.each([
    ["/quality", true],
    ["/cabinet/pairs/P-PW2-26-00042-Q", true],
    ["/cabinet/pairs/P-PW2-26-00042-Q?station=press#hold", true],
    ["https://elsewhere.test/", false],
    ["//elsewhere.test/x", false],
    ["/\\elsewhere.test/x", false],
    ["/\t/elsewhere.test/x", false],
    ["/\n/elsewhere.test", false],
    ["javascript:alert(1)", false],
    ["quality", false],
    ["", false],
  ])("%j is a local path: %s", (path, ok) => {
    expect(isLocalPath(path)).toBe(ok);
  });

  test.each([
    ["/quality", "/quality?dispositioned=NC-2612-003"],
    ["/cabinet/pairs/P-1?station=press", "/cabinet/pairs/P-1?station=press&dispositioned=NC-2612-003"],
    ["/quality?dispositioned=NC-2612-001#open", "/quality?dispositioned=NC-2612-003#open"],
  ])("%j returns to %j", (back, to) => {
    expect(withQuery(back, "dispositioned", "NC-2612-003")).toBe(to);
  });

  const form = { ncId: "n1", disposition: "use_as_is", reason: "within the deviation we allow" };
  test.each([
    ["", true],
    ["/quality", true],
    ["https://elsewhere.test/", false],
    ["//elsewhere.test", false],
  ])("the schema takes back=%j: %s", (back, ok) => {
    const parsed = dispositionSchema.safeParse({ ...form, back });
    expect(parsed.success).toBe(ok);
    if (!parsed.success) expect(parsed.error.issues[0]?.message).toBe("The page to return to must be a page of Twinleaf.");
  });
});
