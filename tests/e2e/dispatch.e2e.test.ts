import { readFileSync } from "node:fs";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import { AxeBuilder } from "@axe-core/playwright";
import { simpleParser } from "mailparser";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { certificates, dealers, items } from "@/db/schema";
import { demoEmail, launchBrowser, newPage, signIn, url, waitForMail } from "./browser-helpers";

let browser: Browser;
let page: Page;
const { client, db } = openDb(inject("databaseUrl"));

beforeAll(async () => {
  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("packing"));
});
afterAll(async () => {
  await browser?.close();
  client.close();
});

// WCAG 2.1 A and AA rules, as axe-core tags them (as in accessibility.e2e.test.ts).
async function violations(p: Page) {
  await p.waitForFunction(() => document.title.length > 0);
  const result = await new AxeBuilder({ page: p }).withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"]).analyze();
  return result.violations.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(" ")).join(", ")})`);
}

describe("dispatch, as a packer does it", () => {
  let pair = "";
  let carton = "";
  const tracking = `E2E-${Date.now().toString(36).toUpperCase()}`;

  test("packs a tested pair from the packers' home: every item ticked, a storage place", async () => {
    await page.goto(url("/packing"));
    await page.getByTestId("area-packing").waitFor();
    await expect(page.getByTestId("safety-cautions").textContent()).resolves.toMatch(/two people or a lifting aid/);
    expect(await violations(page), "/packing").toEqual([]);
    const row = page.getByTestId("ready-pair").first();
    pair = (await row.locator("td").first().textContent())!.trim();
    expect(pair).toMatch(/^P-/);
    await row.getByRole("link", { name: `Pack ${pair}` }).click();
    await page.getByTestId("pack-page").waitFor();
    expect(await violations(page), "pack page").toEqual([]);

    // One box left unticked: refused, nothing packed, the ticks kept.
    const boxes = page.getByTestId("pack-item");
    const n = await boxes.count();
    expect(n).toBeGreaterThanOrEqual(3);
    for (let i = 0; i < n - 1; i++) await boxes.nth(i).check();
    await page.getByLabel("Storage location").fill("Rack E2E, shelf 1");
    await page.getByTestId("pack-submit").click();
    await expect(page.getByTestId("pack-refused").textContent()).resolves.toMatch(/^Tick every item: .+ is not ticked\.$/);
    expect(await violations(page), "pack page with its error").toEqual([]);
    expect(await boxes.nth(0).isChecked()).toBe(true);

    await boxes.nth(n - 1).check();
    await page.getByTestId("pack-submit").click();
    await page.getByTestId("packed").waitFor();
    carton = (await page.getByTestId("packed-carton").textContent())!.trim();
    expect(carton).toMatch(/^K-/);
    await expect(page.getByTestId("print-carton-label").getAttribute("target")).resolves.toBe("_blank");
  });

  test("prints the carton label: a PDF", async () => {
    const href = await page.getByTestId("print-carton-label").getAttribute("href");
    const res = await page.request.get(url(href!));
    expect(res.status()).toBe(200);
    expect(res.headers()["content-type"]).toBe("application/pdf");
    expect((await res.body()).subarray(0, 5).toString()).toBe("%PDF-");
  });

  test("ships it to a dealer; the dealer's e-mail arrives with the certificate attached", async () => {
    const [dealer] = await db.select().from(dealers).where(eq(dealers.code, "MLR"));
    await page.goto(url("/packing"));
    const form = page.getByTestId("ship-form");
    await form.locator(`input[name="cartons"][value="${carton}"]`).check();
    await form.getByLabel("Dealer").selectOption(dealer!.id);
    await form.getByLabel("Carrier").fill("Fernway Freight");
    await form.getByLabel("Tracking number").fill(tracking);
    await form.getByRole("button", { name: /^Ship 1 carton$/ }).click();
    await expect(page.getByTestId("shipped").textContent()).resolves.toMatch(/^Shipment H-MLR-/);
    await expect(page.getByTestId("shipped-today").textContent()).resolves.toContain(carton);

    const message = await waitForMail(dealer!.email, new RegExp(`^Shipped: 1 matched pair, tracking ${tracking}$`));
    expect(message.text).toContain(pair);
    const raw = await simpleParser(readFileSync(join(inject("mailboxDir"), message.id)));
    expect(raw.attachments.map((a) => [a.filename, a.contentType])).toEqual([[`certificate-${pair}.pdf`, "application/pdf"]]);
    expect(raw.attachments[0]!.content.subarray(0, 5).toString()).toBe("%PDF-");
  });

  test("a signed-out phone opens the certificate's link and sees it is genuine; a wrong code is a 404", async () => {
    const [row] = await db
      .select({ code: certificates.code })
      .from(certificates)
      .innerJoin(items, eq(items.id, certificates.pairId))
      .where(eq(items.identity, pair));
    const context = await browser.newContext({ viewport: { width: 390, height: 844 } });
    try {
      const phone = await context.newPage();
      const res = await phone.goto(url(`/verify/${row!.code}`));
      expect(res?.status()).toBe(200);
      await expect(phone.getByTestId("verify-genuine").textContent()).resolves.toMatch(/This is a genuine Twinleaf certificate/);
      await expect(phone.getByTestId("verify-pair").textContent()).resolves.toBe(pair);
      expect(await violations(phone), "verify page").toEqual([]);
      // Nothing internal: no dealer, no names of people.
      const body = (await phone.locator("main").textContent())!;
      expect(body).not.toMatch(/Merrow Lane|Fernway|@/);

      const missing = await phone.goto(url(`/verify/${"a".repeat(26)}`));
      expect(missing?.status()).toBe(404);
      await expect(phone.getByTestId("verify-unknown").textContent()).resolves.toMatch(/No certificate has this code\. Check the address on your certificate\./);
      expect(await violations(phone), "verify 404").toEqual([]);
    } finally {
      await context.close();
    }
  });
});
