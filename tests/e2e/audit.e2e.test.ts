import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
let admin: Page;
let quality: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  admin = await newPage(browser);
  await signIn(admin, demoEmail("admin"));
  quality = await newPage(browser);
  await signIn(quality, demoEmail("quality"));
});
afterAll(async () => {
  await browser?.close();
});

describe("Administration → Audit trail", () => {
  test("the admin opens it from the admin home and reads the seeded log as intact", async () => {
    await visit(admin, url("/admin"));
    await admin.getByRole("link", { name: "Open" }).and(admin.locator('[href="/admin/audit"]')).click();
    await admin.getByRole("heading", { name: "Audit trail", level: 1 }).waitFor();
    const result = admin.getByTestId("audit-result");
    await expect(result.textContent()).resolves.toMatch(/^Intact: \d+ events, each chained to the one before it, and every protective rule in place\.$/);
    // No fingerprint or trigger name on the page: plain words only.
    expect(await admin.locator("main").textContent()).not.toMatch(/[0-9a-f]{32}|_no_/);
  });

  test("another role is refused", async () => {
    const res = await visit(quality, url("/admin/audit"));
    expect(res?.status()).toBe(403);
  });
});
