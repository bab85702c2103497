import { sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { mod37_2Check } from "@/lib/serials";
import { demoEmail, launchBrowser, newPage, signIn, url } from "./browser";

let browser: Browser;
let page: Page;
// The repair in the demo history: the failed unit, the speaker it came out of, and the pair.
let repair: { failed: string; replacement: string; speaker: string; pair: string };

beforeAll(async () => {
  const { client, db } = openDb(inject("databaseUrl"));
  const rows = await db.all<{ failed: string; replacement: string; speaker: string; pair: string }>(sql`
    SELECT f.identity AS failed, r.identity AS replacement, s.identity AS speaker, p.identity AS pair
    FROM links l
    JOIN items f ON f.id = l.child_id
    JOIN items s ON s.id = l.parent_id
    JOIN links lr ON lr.parent_id = l.parent_id AND lr.position = l.position AND lr.ended_at IS NULL
    JOIN items r ON r.id = lr.child_id
    JOIN links lp ON lp.child_id = s.id AND lp.ended_at IS NULL
    JOIN items p ON p.id = lp.parent_id AND p.kind = 'pair'
    WHERE l.ended_at IS NOT NULL AND f.kind = 'drive_unit'
    LIMIT 1`);
  client.close();
  expect(rows, "the demo history holds one repair").toHaveLength(1);
  repair = rows[0]!;
  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("service"));
});
afterAll(async () => {
  await browser?.close();
});

async function typeInSearch(text: string, enter = false) {
  await page.goto(url("/"));
  const box = page.getByTestId("search-input");
  await box.fill(text);
  if (enter) await box.press("Enter");
}

describe("search and trace in the register", () => {
  test("a scanned serial (text then Enter) opens its page", async () => {
    await typeInSearch(repair.pair.toLowerCase().replace(/-/g, " "), true);
    await page.getByTestId("item-page").waitFor();
    await expect(page.getByTestId("item-identity").textContent()).resolves.toBe(repair.pair);
  });

  test("a serial with one character slipped is answered with the serial it could have been", async () => {
    // Change one body character so the check character no longer fits (ISO/IEC 7064 catches every single substitution).
    const body = repair.pair.replace(/-/g, "").slice(0, -1);
    const i = body.length - 2;
    const wrongDigit = body[i] === "7" ? "8" : "7";
    const mistyped = repair.pair.replace(new RegExp(`${body[i]}(-[^-]+)$`), `${wrongDigit}$1`);
    expect(mod37_2Check(mistyped.replace(/-/g, "").slice(0, -1))).not.toBe(mistyped.slice(-1));
    await typeInSearch(mistyped);
    const options = page.getByTestId("search-option").and(page.locator('[data-group="Did you mean"]'));
    await expect(options.first().textContent()).resolves.toContain(repair.pair);
  });

  test("anything else is searched fuzzily, dealers included", async () => {
    await typeInSearch("Merow Lane");
    await expect(page.getByTestId("search-option").first().textContent()).resolves.toContain("Merrow Lane");
  });

  test("the repaired pair shows both halves; now it holds the replacement, as built the failed unit", async () => {
    await page.goto(url(`/register/items/${encodeURIComponent(repair.pair)}`));
    await page.getByTestId("pair-halves").waitFor();
    await page.getByTestId("trace-tree").waitFor();
    const halves = page.getByTestId("pair-halves");
    await expect(halves.textContent()).resolves.toContain(repair.replacement);
    await expect(halves.textContent()).resolves.not.toContain(repair.failed);

    await page.getByRole("link", { name: "As built" }).click();
    await page.getByTestId("moment-label").filter({ hasText: "as built" }).waitFor();
    await expect(halves.textContent()).resolves.toContain(repair.failed);
    await expect(halves.textContent()).resolves.not.toContain(repair.replacement);
  });

  test("the failed unit's page says where it was; the API traces it forward as of the build", async () => {
    const res = await page.request.get(url(`/api/v1/items/${encodeURIComponent(repair.failed)}/trace?direction=forward&asOf=built`));
    expect(res.status()).toBe(200);
    const body = await res.json();
    const kinds = body.nodes.map((n: { kind: string }) => n.kind);
    expect(kinds).toEqual(expect.arrayContaining(["drive_unit", "speaker", "pair", "carton", "shipment"]));
    const now = await (await page.request.get(url(`/api/v1/items/${encodeURIComponent(repair.failed)}/trace?direction=forward&asOf=now`))).json();
    expect(now.nodes.map((n: { identity: string }) => n.identity)).toEqual([repair.failed]);
  });

  test("a bad date is refused with a clear message", async () => {
    const res = await page.request.get(url(`/api/v1/items/${encodeURIComponent(repair.pair)}/trace?asOf=yesterday-ish`));
    expect(res.status()).toBe(400);
    expect((await res.json()).fieldErrors.asOf[0]).toMatch(/Use now, built, ever, or a date/);
  });
});
