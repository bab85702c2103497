/**
 * An out-of-warranty repair charged, as the desk and the owner do it in Chromium: the quote (a price
 * typed wrongly refused beside its cell), the payment link sent through the provider's SDK to the
 * stand-in, the owner's e-mail caught by the stand-in SMTP server, the owner paying on the
 * stand-in's page, its signed webhook recorded once, and the case ready to repair again.
 */
import { eq, sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { serviceCases } from "@/db/schema";
import { daysAgo, makeServiceCase, type MadeCase } from "../fixtures/service-case";
import { axeViolations, demoEmail, launchBrowser, linkIn, newPage, signIn, url, visit, waitForMail } from "./browser-helpers";

let browser: Browser;
let page: Page;
const { client, db } = openDb(inject("databaseUrl"));
let made: MadeCase;

beforeAll(async () => {
  // Shipped eleven years ago: out of warranty whatever the demo's model gives.
  made = await makeServiceCase(db, { shippedOn: daysAgo(4000) });
  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("service"));
});
afterAll(async () => {
  await browser?.close();
  client.close();
});

const paymentsFor = async (caseId: string) => Number((await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM payments WHERE case_id = ${caseId}`))[0]!.n);

describe("charging an out-of-warranty repair", () => {
  test("the desk quotes it; a price with three decimals is refused next to its cell", async () => {
    await visit(page, url(`/service/cases/${made.code}/quote`));
    await page.getByTestId("quote-page").waitFor();
    await expect(page.getByTestId("warranty-over").textContent()).resolves.toMatch(/Out of warranty/);
    expect(await axeViolations(page), "quote page").toEqual([]);

    const first = page.getByTestId("quote-line-0");
    await first.getByLabel("What").fill("Tweeter, matched to the surviving unit");
    await first.getByLabel(/Price of one/).fill("120.505");
    const labour = page.getByTestId("quote-line-4");
    await labour.getByLabel("What").fill("Bench time");
    await labour.getByLabel("How many").fill("2");
    await labour.getByLabel(/Price of one/).fill("45");
    await page.getByRole("button", { name: "Save the quote" }).click();
    await page.getByTestId("quote-refused").waitFor();
    const price = first.getByLabel(/Price of one/);
    await expect(price.getAttribute("aria-invalid")).resolves.toBe("true");
    const described = (await price.getAttribute("aria-describedby"))!;
    await expect(page.locator(`[id="${described}"]`).textContent()).resolves.toMatch(/2 decimal places at most/);
    expect(await db.all(sql`SELECT id FROM quotes WHERE case_id = ${made.caseId}`)).toEqual([]);
    expect(await axeViolations(page), "quote page with a refusal").toEqual([]);

    // What was typed stays; corrected, it is saved. 120,50 + 2 × 45 = €210.50.
    await expect(labour.getByLabel("What").inputValue()).resolves.toBe("Bench time");
    await price.fill("120,50");
    await page.getByRole("button", { name: "Save the quote" }).click();
    await page.getByTestId("quoted").waitFor();
    await expect(page.getByTestId("quote-total").textContent()).resolves.toBe("€210.50");
  });

  test("the payment link goes to the owner, the owner pays on the provider's page, and the case is ready to repair", async () => {
    await page.getByRole("button", { name: "Send the payment link" }).click();
    await page.getByTestId("link-sent").waitFor();
    expect((await db.select({ s: serviceCases.state }).from(serviceCases).where(eq(serviceCases.id, made.caseId)))[0]!.s).toBe("waiting_payment");

    const mail = await waitForMail(made.ownerEmail!, /payment of €210\.50/);
    const link = linkIn(mail, "/pay/");
    expect(new URL(link).origin).toBe(new URL(inject("paymentsUrl")).origin);

    const owner = await browser.newPage();
    await owner.goto(link);
    await owner.getByTestId("stand-in-pay").click();
    await owner.waitForURL(/\/api\/v1\/payments\/done\?/);
    await expect(owner.textContent("h1")).resolves.toBe("Thank you");
    await owner.close();

    await expect.poll(() => paymentsFor(made.caseId), { timeout: 15_000 }).toBe(1);
    await expect.poll(async () => (await db.select({ s: serviceCases.state }).from(serviceCases).where(eq(serviceCases.id, made.caseId)))[0]!.s).toBe("diagnosed");
    await visit(page, url(`/service/cases/${made.code}/quote`));
    await expect(page.getByTestId("payment-history").textContent()).resolves.toMatch(/Paid €210\.50/);
  });

  test("the webhook takes nothing without the provider's signature, from anyone", async () => {
    const res = await fetch(url("/api/v1/payments/webhook"), { method: "POST", headers: { "content-type": "application/json", origin: "https://attacker.example.test" }, body: "{}" });
    expect(res.status).toBe(400);
    expect(await res.json()).toEqual({ error: expect.stringMatching(/signature/) });
    expect(await paymentsFor(made.caseId)).toBe(1);
  });
});
