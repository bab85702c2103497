import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { demoEmail, launchBrowser, newPage, signIn, url } from "./browser-helpers";

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
    await page.goto(url("/lab/crossovers"));
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
});
