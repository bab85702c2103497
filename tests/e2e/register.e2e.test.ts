import { sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { mod37_2Check } from "@/lib/serials";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

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
  await visit(page, url("/"));
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
    // Change the last digit of the sequence; ISO/IEC 7064 MOD 37-2 catches every single substitution.
    const parts = repair.pair.split("-");
    const seq = parts[3]!;
    parts[3] = seq.slice(0, -1) + String((Number(seq.slice(-1)) + 1) % 10);
    const mistyped = parts.join("-");
    expect(mod37_2Check(parts.slice(0, -1).join(""))).not.toBe(parts.at(-1));
    await typeInSearch(mistyped);
    const options = page.getByTestId("search-option").and(page.locator('[data-group="Did you mean"]'));
    await expect(options.first().textContent()).resolves.toContain(repair.pair);
  });

  test("the results are reached with the keyboard: arrow down to a result, Enter opens it", async () => {
    await typeInSearch("Merow Lane");
    await page.getByTestId("search-option").first().waitFor();
    const box = page.getByTestId("search-input");
    await box.press("ArrowDown");
    await box.press("ArrowUp");
    const active = page.locator('[data-testid="search-option"][aria-selected="true"]');
    await expect(active.textContent()).resolves.toContain("Merrow Lane");
    await box.press("Enter");
    await page.getByTestId("dealer-page").waitFor();
    expect(new URL(page.url()).pathname).toMatch(/^\/register\/dealers\//);
  });

  test("a fragment of a tracking number finds the shipment and says it was found by its tracking number", async () => {
    const { client, db } = openDb(inject("databaseUrl"));
    const [shipment] = await db.all<{ identity: string; tracking: string }>(sql`
      SELECT i.identity, sd.tracking FROM shipment_details sd JOIN items i ON i.id = sd.item_id ORDER BY i.identity LIMIT 1`);
    client.close();
    expect(shipment, "the demo history ships at least once").toBeDefined();
    await typeInSearch(shipment!.tracking.slice(2, 10).toLowerCase());
    const option = page.getByTestId("search-option").filter({ hasText: shipment!.identity });
    await expect(option.textContent()).resolves.toContain(`Shipment · shipped · tracking number ${shipment!.tracking}`);
  });

  test("anything else is searched fuzzily, dealers included", async () => {
    await typeInSearch("Merow Lane");
    await expect(page.getByTestId("search-option").first().textContent()).resolves.toContain("Merrow Lane");
  });

  test("the front page lists the dealers shipped to lately; every dealer is one link away", async () => {
    await visit(page, url("/register"));
    const recent = page.getByTestId("dealer-table").locator("tbody tr");
    await expect(recent.count()).resolves.toBeGreaterThan(0);
    await expect(recent.count()).resolves.toBeLessThanOrEqual(20);
    await page.getByTestId("every-dealer-link").click();
    await page.getByTestId("every-dealer").waitFor();
    // The demo's dealers, by name; each opens its own page.
    const names = await page.getByTestId("dealer-table").locator("tbody tr td:nth-child(2)").allTextContents();
    expect(names).toEqual([...names].sort((a, b) => a.localeCompare(b, undefined, { numeric: true })));
    await page.getByTestId("dealer-table").getByRole("link", { name: names[0]! }).click();
    await expect.poll(() => new URL(page.url()).pathname).toMatch(/^\/register\/dealers\/.+/);
  });

  test("the repaired pair shows both halves; now it holds the replacement, as built the failed unit", async () => {
    await visit(page, url(`/register/items/${encodeURIComponent(repair.pair)}`));
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
    expect((await res.json()).fieldErrors.asOf[0]).toMatch(/Use now, built, ever, a date/);
  });

  test("a label prints as a PDF, its barcode serves as PNG, and a second print is recorded as a reprint", async () => {
    const png = await page.request.get(url(`/api/v1/items/${encodeURIComponent(repair.pair)}/barcode?format=png`));
    expect(png.headers()["content-type"]).toBe("image/png");
    expect((await png.body()).subarray(1, 4).toString()).toBe("PNG");
    for (let i = 0; i < 2; i++) {
      const pdf = await page.request.post(url("/api/v1/labels"), { headers: { origin: new URL(url("/")).origin }, data: { identities: [repair.pair], layout: "thermal-100x50", printerDpi: 300, station: "service" } });
      expect(pdf.status()).toBe(200);
      expect((await pdf.body()).subarray(0, 5).toString()).toBe("%PDF-");
    }
    const events = await (await page.request.get(url("/api/v1/events?limit=5&station=service"))).json();
    const prints = events.events.filter((e: { type: string; data: { identity?: string } }) => e.type === "label.printed" && e.data.identity === repair.pair);
    expect(prints.map((e: { data: { reprint: boolean } }) => e.data.reprint)).toEqual([true, false]);
  });

  test("bad label requests write nothing and say why", async () => {
    const before = (await (await page.request.get(url("/api/v1/events?limit=1"))).json()).events[0].id;
    const unknown = await page.request.post(url("/api/v1/labels"), { headers: { origin: new URL(url("/")).origin }, data: { identities: ["P-NOPE-26-00001-X"], layout: "a4-3x8" } });
    expect(unknown.status()).toBe(404);
    expect((await unknown.json()).error).toContain("P-NOPE-26-00001-X");
    const badLayout = await page.request.post(url("/api/v1/labels"), { headers: { origin: new URL(url("/")).origin }, data: { identities: [repair.pair], layout: "postcard" } });
    expect(badLayout.status()).toBe(400);
    const after = (await (await page.request.get(url("/api/v1/events?limit=1"))).json()).events[0].id;
    expect(after).toBe(before);
  });
});
