/**
 * The owner's messages: everything the desk or the owner typed is escaped in the HTML, and money
 * is shown from minor units with the currency's own minor digits (ISO 4217: GBP and EUR 2, JPY 0,
 * BHD 3), as Intl.NumberFormat (ICU's currency data, an independent table) formats it.
 */
import { describe, expect, test } from "vitest";
import { caseMessageMail, formatMinor } from "@/lib/mail/templates";
import { ownerMailOutcome } from "@/lib/service/messages";

describe("money from minor units", () => {
  test.each([
    [12345, "GBP", "£123.45"],
    [5, "GBP", "£0.05"],
    [-250, "EUR", "-€2.50"],
    [1500, "JPY", "JP¥1,500"],
    [1234, "BHD", "BHD 1.234"],
    [123456789012, "GBP", "£1,234,567,890.12"], // worked by hand: the point is placed in the digits, never divided
  ])("%i minor units of %s: %s", (minor, currency, text) => {
    expect(formatMinor(minor, currency).replace(/\u00a0/g, " ")).toBe(text);
  });
  test("a fraction of a minor unit is refused", () => {
    expect(() => formatMinor(1.5, "GBP")).toThrow(/whole number/);
  });
});

describe("the messages", () => {
  const base = { ownerName: `Ada <script>alert("x")</script>`, caseCode: "RT2612-0007", what: "speaker SP-1 of your pair P-1", model: "Sallow & Studio" };
  test.each(["received", "diagnosis", "on_its_way", "closed"] as const)("%s: the HTML escapes what was typed", (kind) => {
    const m = caseMessageMail({ ...base, kind, findings: ["tweeter <b>dead</b>"], receivedOn: "5 Dec 2026" });
    expect(m.html).not.toContain("<script>");
    expect(m.html).not.toContain("<b>dead</b>");
    expect(m.html).toContain("Ada &lt;script&gt;");
    expect(m.subject).toContain("RT2612-0007");
  });
  test("a diagnosis out of warranty carries the quote", () => {
    const m = caseMessageMail({ ...base, kind: "diagnosis", inWarranty: false, findings: ["left speaker, tweeter (T): no output"], quote: { lines: [{ description: "Tweeter", amountMinor: 8900 }, { description: "Labour", amountMinor: 4500 }], totalMinor: 13400, currency: "GBP" } });
    expect(m.text).toContain("out of warranty");
    expect(m.text).toContain("Tweeter: £89.00");
    expect(m.text).toContain("Total: £134.00");
  });
});

describe("who may be written to", () => {
  test.each([
    [null, "no_owner"],
    [{ email: null, consent: { given: true, at: new Date() } }, "no_email"],
    [{ email: "a@example.com", consent: null }, "no_consent"],
    [{ email: "a@example.com", consent: { given: false, at: new Date() } }, "no_consent"],
    [{ email: "a@example.com", consent: { given: true, at: new Date() } }, "queued"],
  ] as const)("%j: %s", (owner, outcome) => {
    expect(ownerMailOutcome(owner)).toBe(outcome);
  });
});
