import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("veneer"));
});
afterAll(async () => {
  await browser?.close();
});

// The demo's two-way model takes 2 leaves a face, at least 410 × 165 mm (invented demo data).
const rows = Array.from({ length: 12 }, (_, i) => `${i + 1},${450 + i},${190 + (i % 3)},yes,,,`).join("\n");

describe("the veneer room, as a veneer user does it", () => {
  let flitch = "";

  test("receives a flitch of 12 leaves", async () => {
    await visit(page, url("/veneer"));
    await page.getByTestId("receive-flitch").click();
    const form = page.getByTestId("receive-form");
    await form.waitFor();
    await form.getByLabel("Species").selectOption({ index: 1 });
    await form.getByLabel("Log or bundle reference").fill("LOG-E2E-1");
    await form.getByLabel("Supplier").fill("A test supplier");
    await form.getByLabel("Number of leaves").fill("12");
    await expect(form.getByLabel("Leaf thickness (mm)").inputValue()).resolves.toBe("0.6");
    await form.getByRole("button", { name: "Receive flitch" }).click();
    await page.getByTestId("received-notice").waitFor();
    flitch = (await page.getByTestId("flitch-identity").textContent())!;
    expect(flitch).toMatch(/^F-[A-Z0-9]+-\d{2}-\d{5}-[0-9A-Z*]$/);
    await expect(page.getByTestId("leaf-table").locator("tbody tr").count()).resolves.toBe(12);
  });

  test("a CSV with a bad row is refused as a whole, row by row; a good one fills the table", async () => {
    const importer = page.getByTestId("csv-import");
    await importer.locator("textarea").fill(`seq,length_mm,width_mm,usable\n1,450,190,yes\n2,abc,190,yes\n14,450,190,yes`);
    const preview = page.getByTestId("csv-preview");
    await expect(preview.textContent()).resolves.toMatch(/2 problems/);
    await expect(importer.getByRole("button", { name: "Import leaves" }).isDisabled()).resolves.toBe(true);
    await importer.locator("textarea").fill(`seq,length_mm,width_mm,usable,defect,defect_note,defect_position_mm\n${rows}`);
    await expect(preview.textContent()).resolves.toMatch(/12 rows look right/);
    await importer.getByRole("button", { name: "Import leaves" }).click();
    await page.getByTestId("csv-done").waitFor();
    await expect(page.getByLabel("Length of leaf 5, mm").inputValue()).resolves.toBe("454");
  });

  test("marks leaf 6 defective", async () => {
    await page.getByTestId("leaf-row-6").getByRole("button", { name: "Note a defect on leaf 6" }).click();
    const dialog = page.getByTestId("defect-form");
    await dialog.getByLabel("Kind").selectOption("split");
    await dialog.getByLabel("Note").fill("end split, runs 200 mm");
    await dialog.getByLabel("Position along the leaf (mm)").fill("0");
    await dialog.getByRole("button", { name: "Note defect" }).click();
    await expect.poll(() => page.getByTestId("leaf-row-6").textContent()).toMatch(/split.*unusable/);
  });

  test("plans two pairs around the split leaf and confirms them; the label sheet opens", async () => {
    await page.getByTestId("plan-controls").getByLabel("Reserve leaves per pair").selectOption("0");
    await page.getByTestId("plan-controls").getByRole("button", { name: "Draw the plan" }).click();
    await page.waitForURL(/reserve=0/);
    const picture = page.getByTestId("plan-picture");
    await picture.waitFor();
    // Leaves 1–4 and 7–10 make the two runs; 6 is split, 5, 11 and 12 are left over.
    const roles = await picture.locator("[data-seq]").evaluateAll((els) => els.map((e) => `${e.getAttribute("data-seq")}:${e.getAttribute("data-role")}`));
    expect(roles).toEqual(["1:left", "2:right", "3:left", "4:right", "5:leftover", "6:unusable", "7:left", "8:right", "9:left", "10:right", "11:leftover", "12:leftover"]);
    await expect(page.getByTestId("plan-picture-summary").textContent()).resolves.toMatch(/^2 pairs/);
    await page.getByRole("button", { name: "Confirm and make pairs" }).click();
    await page.getByTestId("confirmed-page").waitFor();
    await expect(page.getByTestId("new-pairs").locator("li").count()).resolves.toBeGreaterThanOrEqual(2);
    // The sheet is what the label route answered; the page shows it from a blob (the page's CSP lets
    // no script fetch a blob, so the answer is looked at on its way in).
    const answered = page.waitForResponse((r) => r.url().endsWith("/api/v1/labels") && r.request().method() === "POST");
    await page.getByTestId("label-sheet-print").click();
    const sheet = await answered;
    await page.getByTestId("label-sheet").waitFor({ timeout: 20_000 });
    await expect(page.getByTestId("label-sheet-open").getAttribute("href")).resolves.toMatch(/^blob:/);
    expect(sheet.status()).toBe(200);
    expect(sheet.headers()["content-type"]).toBe("application/pdf");
    // The browser keeps the body it turned into a blob; the same request, sent again, shows it is a PDF.
    const again = await page.request.post(sheet.url(), { headers: { origin: new URL(sheet.url()).origin, "content-type": "application/json" }, data: sheet.request().postData() ?? "" });
    expect((await again.body()).subarray(0, 5).toString("latin1")).toBe("%PDF-");
  });

  test("the new pair is in the register with its leaves in its trace", async () => {
    const pair = (await page.getByTestId("new-pairs").locator("a").first().textContent())!;
    await page.getByTestId("new-pairs").locator("a").first().click();
    await page.getByTestId("item-page").waitFor();
    await expect(page.getByTestId("item-identity").textContent()).resolves.toBe(pair);
    const veneer = page.getByTestId("pair-veneer");
    await expect(veneer.textContent()).resolves.toContain(`${flitch}/01`);
    await expect(veneer.textContent()).resolves.toContain(`${flitch}/02`);
    await expect(page.getByTestId("pair-halves").textContent()).resolves.toMatch(/C-/);
  });
});

describe("photos of a flitch", () => {
  test("a photo uploaded on the flitch page shows as a thumbnail served to the signed-in user", async () => {
    const sharp = (await import("sharp")).default;
    // A small generated picture (a gradient), not a real photo.
    const width = 64;
    const height = 40;
    const raw = Buffer.alloc(width * height * 3);
    for (let i = 0; i < width * height; i++) raw.set([120 + (i % width), 80, 40 + Math.floor(i / width)], i * 3);
    const png = await sharp(raw, { raw: { width, height, channels: 3 } }).png().toBuffer();
    await visit(page, url("/veneer"));
    await page.getByTestId("flitch-table").locator("a").first().click();
    await page.getByTestId("flitch-page").waitFor();
    const form = page.getByTestId("photo-upload");
    await form.locator('input[type="file"]').setInputFiles({ name: "flitch-end.png", mimeType: "image/png", buffer: png });
    await form.getByRole("button", { name: /Upload/ }).click();
    const thumb = page.getByTestId("thumbnails").locator("img").first();
    await thumb.waitFor({ timeout: 15_000 });
    const src = (await thumb.getAttribute("src"))!;
    const res = await page.request.get(url(src));
    expect(res.status()).toBe(200);
    expect(res.headers()["x-content-type-options"]).toBe("nosniff");
    expect(res.headers()["content-type"]).toBe("image/jpeg");
    expect(res.headers()["content-disposition"]).toMatch(/^inline; filename=/);
  });
});
