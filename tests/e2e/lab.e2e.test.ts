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

const MAKER = ["E2E-A1", "E2E-A2", "E2E-A3", "E2E-A4"];
// Made-up flat responses: A1/A2 and A3/A4 are close, the two groups 1 dB apart.
const LEVELS = [90, 90.05, 91, 91.03];
const responseFile = (level: number) =>
  ["Freq(Hz)\tSPL(dB)", ...Array.from({ length: 60 }, (_, k) => `${(1000 * 2 ** (k / 12)).toFixed(1)}\t${level.toFixed(2)}`)].join("\n");

describe("the lab, as a lab user does it", () => {
  let batch = "";

  test("registers a batch of tweeters by scanning the makers' serials", async () => {
    await page.goto(url("/lab"));
    await page.getByTestId("register-batch").click();
    const form = page.getByTestId("batch-form");
    await form.getByLabel("Part type").selectOption("tweeter");
    await form.getByLabel("Maker's part number").fill("T-E2E");
    await form.getByLabel("Maker", { exact: true }).fill("A test maker");
    await form.getByLabel("Production or supplier lot").fill("LOT-E2E");
    await form.getByLabel("Makers’ serials (optional)").fill(MAKER.join("\n"));
    await form.getByRole("button", { name: "Register batch" }).click();
    await page.getByTestId("batch-page").waitFor();
    batch = (await page.getByTestId("batch-code").textContent())!;
    await expect(page.getByTestId("units-table").locator("tbody tr").count()).resolves.toBe(4);
  });

  test("brings in four response files at once, matched by the maker's serial in the file name", async () => {
    const upload = page.getByTestId("response-upload");
    await upload.locator('input[type="file"]').setInputFiles(MAKER.map((m, i) => ({ name: `${m}.txt`, mimeType: "text/plain", buffer: Buffer.from(responseFile(LEVELS[i]!)) })));
    await upload.getByRole("button", { name: "Save 4 responses" }).click();
    await page.getByTestId("responses-saved").waitFor();
    await expect.poll(() => page.getByTestId("units-table").textContent()).not.toMatch(/awaiting/);
  });

  test("a parameters CSV with an unknown serial is refused as a whole", async () => {
    await page.getByRole("tab", { name: "Thiele–Small CSV" }).click();
    const csv = page.getByTestId("ts-csv-import");
    await csv.locator("textarea").fill(`serial,fs,qes,qms,re\n${MAKER[0]},900,1.1,2.2,4.7\nNOT-A-UNIT,900,1.1,2.2,4.7`);
    await csv.getByRole("button", { name: "Save parameters" }).click();
    await expect(page.getByTestId("ts-csv-error").textContent()).resolves.toMatch(/Line 3: NOT-A-UNIT/);
  });

  test("sees the optimal plan, accepts it, and the reserved sets wait for assembly", async () => {
    await page.getByTestId("match-batch").click();
    await page.getByTestId("match-page").waitFor();
    await expect(page.getByTestId("plan-pairs").locator("tbody tr").count()).resolves.toBe(2);
    await expect(page.getByTestId("pair-chart").count()).resolves.toBe(2);
    await page.getByRole("button", { name: /Accept the plan/ }).click();
    await expect(page.getByTestId("plan-accepted").textContent()).resolves.toMatch(/2 matched sets reserved/);
    await page.goto(url("/lab"));
    await expect(page.getByTestId("lab-sets").textContent()).resolves.toContain(`M-${batch}-001`);
    // The set is in the register: a unit's page names its set and its partner.
    await page.getByTestId("lab-sets").locator("a").first().click();
    await expect(page.getByTestId("lab-origin").textContent()).resolves.toMatch(new RegExp(`Reserved in matched set M-${batch}-00\\d as the (left|right) unit, with D-TW-`));
  });
});
