/**
 * The service desk in Chromium: a returned speaker taken in (a refusal first), a finding, the
 * diagnosis, the owner's e-mails at the stand-in SMTP server, and the case on the service home.
 */
import { sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { axeViolations, demoEmail, launchBrowser, newPage, signIn, url, visit, waitForMail } from "./browser-helpers";

let browser: Browser;
let page: Page;
const { client, db } = openDb(inject("databaseUrl"));

beforeAll(async () => {
  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("service"));
});
afterAll(async () => {
  await browser?.close();
  client.close();
});

describe("a returned speaker at the desk", () => {
  const ownerEmail = `owner-${Date.now().toString(36)}@example.com`;
  let code = "";

  test("intake: an unknown serial is refused next to its field; a speaker typed loosely opens a case", async () => {
    // A shipped pair with no open case, and its left speaker.
    const [row] = await db.all<{ pair: string; L: string }>(sql`
      SELECT p.identity AS pair, (SELECT i.identity FROM links l JOIN items i ON i.id = l.child_id WHERE l.parent_id = p.id AND l.position = 'L' AND l.ended_at IS NULL) AS L
      FROM items p WHERE p.kind = 'pair' AND p.state = 'shipped'
        AND NOT EXISTS (SELECT 1 FROM service_cases c WHERE c.pair_id = p.id AND c.state NOT IN ('closed', 'cancelled'))
      ORDER BY p.identity DESC LIMIT 1`);
    expect(row?.L).toBeTruthy();

    await visit(page, url("/service/cases/new"));
    await page.getByTestId("intake-page").waitFor();
    expect(await axeViolations(page), "intake page").toEqual([]);
    const form = page.getByTestId("intake-form");
    await form.getByLabel("Serial of the speaker or pair").fill("SP-NOPE-0000");
    await form.getByLabel("Reported symptom").fill("Tweeter silent");
    await form.getByLabel("New owner").check();
    await form.getByLabel("Name").fill("Ada Fenwick");
    await form.getByLabel("E-mail (optional)").fill(ownerEmail);
    await form.getByLabel("Town").fill("Kelso");
    await form.getByLabel("Country (two letters, e.g. GB)").fill("gb");
    await form.getByLabel("May we contact the owner about this case?").selectOption("yes");
    await page.getByTestId("open-case").click();
    await page.getByTestId("intake-error").waitFor();
    const serialBox = form.getByLabel("Serial of the speaker or pair");
    await expect(serialBox.getAttribute("aria-invalid")).resolves.toBe("true");
    // What was typed stays.
    await expect(form.getByLabel("Name").inputValue()).resolves.toBe("Ada Fenwick");

    await serialBox.fill(row!.L.toLowerCase().replace(/-/g, " "));
    await page.getByTestId("open-case").click();
    await page.getByTestId("case-page").waitFor();
    code = decodeURIComponent(new URL(page.url()).pathname.split("/").pop()!);
    expect(code).toMatch(/^RT\d{4}-\d{4}$/);
    await expect(page.getByTestId("case-state").textContent()).resolves.toBe("Received");
    await expect(page.getByTestId("case-facts").textContent()).resolves.toContain(row!.pair);
    await expect(page.getByTestId("case-warranty").textContent()).resolves.toMatch(/(In|Out of) warranty.*Starts .*Period: \d+ months/);
    await expect(page.getByTestId("case-messages").textContent()).resolves.toContain("We have received your");
    expect(await axeViolations(page), "case page").toEqual([]);
    const mail = await waitForMail(ownerEmail, new RegExp(`case ${code}`));
    expect(mail.text).toContain(row!.L);
  });

  test("diagnosis: refused without a finding, then a finding and the owner told", async () => {
    await page.getByTestId("move-diagnosed").getByRole("button").click();
    await page.getByTestId("move-diagnosed-error").waitFor();
    const finding = page.getByTestId("finding-form");
    await finding.getByLabel("Position").selectOption("XO");
    await finding.getByLabel("What was found").fill("burnt resistor on the tweeter branch");
    await finding.getByRole("button", { name: "Record the finding" }).click();
    await page.getByTestId("case-findings").waitFor();
    await expect(page.getByTestId("case-findings").getByRole("link", { name: "Find a replacement" }).count()).resolves.toBe(0);
    await page.getByTestId("move-diagnosed").getByRole("button").click();
    await page.waitForFunction(() => document.querySelector('[data-testid="case-state"]')?.textContent === "Diagnosed");
    await page.getByTestId("case-findings").getByRole("link", { name: "Find a replacement" }).waitFor();
    const mail = await waitForMail(ownerEmail, new RegExp(`What we found .*case ${code}`));
    expect(mail.text).toContain("burnt resistor on the tweeter branch");
  });

  test("the service home lists it with its age; another stale threshold can be tried", async () => {
    await visit(page, url("/service"));
    await page.getByTestId("service-home").waitFor();
    await expect(page.getByTestId("cases-diagnosed").textContent()).resolves.toContain(code);
    expect(await axeViolations(page), "service home").toEqual([]);
    await visit(page, url("/service?stale=nonsense"));
    await page.getByTestId("stale-refused").waitFor();
  });

  test("a cancellation needs a reason", async () => {
    await visit(page, url(`/service/cases/${code}`));
    const cancel = page.getByTestId("move-cancelled");
    await cancel.getByRole("button").click();
    await cancel.getByText("Say why the case is cancelled.").waitFor();
    await cancel.getByLabel("Why").fill("The owner collected it unrepaired");
    await cancel.getByRole("button").click();
    await page.waitForFunction(() => document.querySelector('[data-testid="case-state"]')?.textContent === "Cancelled");
    await expect(page.getByTestId("case-history").textContent()).resolves.toContain("The owner collected it unrepaired");
  });
});
