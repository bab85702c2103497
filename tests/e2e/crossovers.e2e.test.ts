import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
let page: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("lab"));
});
afterAll(async () => {
  await browser?.close();
});

/** An invented smooth response, 100 Hz to 20 kHz. */
const response = Array.from({ length: 200 }, (_, i) => {
  const hz = 100 * 2 ** (i / 26);
  return `${hz.toFixed(1)} ${(86 + Math.sin(Math.log10(hz))).toFixed(2)}`;
}).join("\n");

describe("crossover boards, as the lab builds them", () => {
  test("a board with a slip saves nothing; corrected, with one part out of tolerance, it is recorded as failed with the reason", async () => {
    await visit(page, url("/lab/crossovers"));
    await page.getByTestId("crossovers-page").waitFor();
    await expect(page.getByTestId("safety-cautions").textContent()).resolves.toMatch(/fume extraction/);

    const form = page.getByTestId("build-form");
    // Keep C1 and L1 of the five rows the form starts with.
    for (const name of ["Remove part 5 (R1)", "Remove part 4 (L2)", "Remove part 2 (C2)"]) await form.getByRole("button", { name }).click();
    const rows = form.getByTestId("part-row");
    await expect(rows.count()).resolves.toBe(2);
    const fill = async (i: number, values: Record<string, string>) => {
      for (const [field, value] of Object.entries(values)) await rows.nth(i).locator(`input[data-field="${field}"]`).fill(value);
    };
    await fill(0, { lot: "LOT-E2E-C47", partNumber: "PP-475-E2E", nominal: "4.8µF", reading: "4.71µF" });
    await fill(1, { lot: "LOT-E2E-L82", partNumber: "AC-082-E2E", nominal: "0.82mH", reading: "0.70 mH" });
    await rows.nth(1).locator('select[data-field="tolerance"]').selectOption("K");
    await form.getByTestId("response-file").setInputFiles({ name: "board-e2e.txt", mimeType: "text/plain", buffer: Buffer.from(`Freq SPL\n${response}\n`) });
    await form.getByRole("button", { name: "Build and check the board" }).click();

    await page.getByTestId("build-refused").waitFor();
    await expect(page.getByTestId("build-refused").textContent()).resolves.toMatch(/Nothing was saved/);
    await expect(rows.nth(0).getByTestId("row-errors").textContent()).resolves.toMatch(/4\.8 µF is not an E24 value; the nearest are 4\.7 µF and 5\.1 µF/);
    await expect(rows.nth(1).getByTestId("row-errors").count()).resolves.toBe(0);
    await expect(page.getByTestId("boards-table").textContent()).resolves.not.toMatch(/LOT-E2E/);

    await fill(0, { nominal: "4.7µF" });
    await form.getByRole("button", { name: "Build and check the board" }).click();
    const failed = page.getByTestId("board-failed");
    await failed.waitFor();
    const message = (await failed.textContent()) ?? "";
    expect(message).toMatch(/X-PW2-\d{2}-\d{5}-[0-9A-Z*] was recorded as failed/);
    expect(message).toMatch(/L1 reads 0\.7 mH, 14\.6 % under its 0\.82 mH nominal; K allows ±10 %/);
    const serial = /X-PW2-\d{2}-\d{5}-[0-9A-Z*]/.exec(message)![0];

    const row = page.getByTestId("boards-table").locator("tbody tr", { hasText: serial });
    await row.waitFor();
    await expect(row.textContent()).resolves.toMatch(/failed/);
    await expect(row.getByTestId("board-reasons").textContent()).resolves.toMatch(/L1 reads 0\.7 mH/);
    await expect(row.textContent()).resolves.toMatch(/yes/);
  });

  test("a reading typed without a unit is read in the nominal's unit, as the preview shows; one ten times away is refused as a slip", async () => {
    await visit(page, url("/lab/crossovers"));
    const form = page.getByTestId("build-form");
    for (const name of ["Remove part 5 (R1)", "Remove part 4 (L2)", "Remove part 3 (L1)", "Remove part 2 (C2)"]) await form.getByRole("button", { name }).click();
    const row = form.getByTestId("part-row").first();
    const fill = async (values: Record<string, string>) => {
      for (const [field, value] of Object.entries(values)) await row.locator(`input[data-field="${field}"]`).fill(value);
    };
    await fill({ lot: "LOT-E2E-C47B", partNumber: "PP-475-E2E", nominal: "4.7µF", reading: "4.72" });
    // The preview under each field is what the server will record (lib/crossover-parts readPartValues).
    await expect.poll(() => row.getByTestId("nominal-preview").textContent()).toBe("= 4.7 µF");
    await expect.poll(() => row.getByTestId("reading-preview").textContent()).toBe("= 4.72 µF");

    await fill({ reading: "4.72F" });
    await expect.poll(() => row.getByTestId("reading-preview").textContent()).toMatch(/^"4\.72F" reads as 4\.72 F, more than ten times its 4\.7 µF nominal/);
    await form.getByRole("button", { name: "Build and check the board" }).click();
    await page.getByTestId("build-refused").waitFor();
    await expect(row.getByTestId("row-errors").textContent()).resolves.toMatch(/Reading: "4\.72F" reads as 4\.72 F, more than ten times its 4\.7 µF nominal/);
    await expect(page.getByTestId("boards-table").textContent()).resolves.not.toMatch(/LOT-E2E-C47B/);

    await fill({ reading: "4.72" });
    await form.getByRole("button", { name: "Build and check the board" }).click();
    await page.getByTestId("board-built").waitFor();
    await expect(page.getByTestId("board-built").textContent()).resolves.toMatch(/X-PW2-\d{2}-\d{5}-[0-9A-Z*] built: every part is within its tolerance/);
  });
});
