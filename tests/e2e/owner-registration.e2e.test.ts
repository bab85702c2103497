/**
 * An owner registers their pair from the public certificate check in Chromium, signed out: the
 * confirmation mail reaches the stand-in SMTP server, its link's button confirms it, and the
 * service desk then sees the owner, confirmed and consenting, on the pair's register page.
 */
import { and, eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { certificates, items } from "@/db/schema";
import { demoEmail, launchBrowser, linkIn, newPage, signIn, url, visit, waitForMail } from "./browser-helpers";

let browser: Browser;
let page: Page;
const { client, db } = openDb(inject("databaseUrl"));
let code = "";
let pair = "";
const email = `e2e-owner-${Date.now()}@example.test`;

beforeAll(async () => {
  const [row] = await db
    .select({ code: certificates.code, identity: items.identity })
    .from(certificates)
    .innerJoin(items, eq(items.id, certificates.pairId))
    .where(and(eq(items.kind, "pair"), eq(items.state, "shipped")))
    .limit(1);
  if (!row) throw new Error("the demo has no shipped pair with a certificate");
  ({ code, identity: pair } = row);
  browser = await launchBrowser();
  page = await newPage(browser);
});
afterAll(async () => {
  await browser?.close();
  client.close();
});

describe("an owner registers their pair", () => {
  test("from the verify page, confirmed by the mailed link, seen by the desk", async () => {
    await visit(page, url(`/verify/${code}`));
    await page.getByTestId("verify-register").waitFor();
    await page.getByLabel("Your name").fill("Wren Calloway");
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Town").fill("Harrowgate Mill");
    await page.getByLabel("Country").fill("gb");
    await page.getByTestId("registration-consent").check();
    await page.getByRole("button", { name: "Register my pair" }).click();
    await expect(page.getByTestId("registration-sent").textContent()).resolves.toContain("If the address is right, a message is on its way");

    const mail = await waitForMail(email, /Confirm the registration/);
    const confirm = linkIn(mail, "/verify/registration/");
    expect(linkIn(mail, "/verify/consent/")).toBeTruthy();
    await visit(page, confirm);
    await page.getByTestId("registration-pending").waitFor();
    await page.getByTestId("registration-confirm").click();
    await expect(page.getByTestId("registration-confirmed").textContent()).resolves.toContain(pair);
    // The link is spent: opened again it says so and offers nothing to press.
    await visit(page, confirm);
    await page.getByTestId("registration-link-gone").waitFor();

    const desk = await newPage(browser);
    await signIn(desk, demoEmail("service"));
    await visit(desk, url(`/register/items/${encodeURIComponent(pair)}`));
    const table = desk.getByTestId("owner-registrations");
    await table.waitFor();
    const text = (await table.textContent())!;
    expect(text).toContain("Wren Calloway");
    expect(text).toContain("Confirmed");
    expect(text).toContain("Consented");
  });
});
