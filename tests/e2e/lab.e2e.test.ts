import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { users } from "@/db/schema";
import { importResponseFiles, registerBatch } from "@/lib/lab/units";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
let page: Page;
/** A batch of two tweeters that cannot pair: the second is 1.43 dB louder in the 2 kHz band. */
let apart = { code: "", units: [] as string[] };

beforeAll(async () => {
  const { client, db } = openDb(inject("databaseUrl"));
  const lab = (await db.select().from(users).where(eq(users.email, demoEmail("lab"))))[0]!.id;
  const b = await registerBatch(db, { partType: "tweeter", partNumber: "T-APART", maker: "An invented maker", lot: "L-APART", receivedOn: new Date().toISOString().slice(0, 10), makerSerials: [], count: 2 }, { id: lab });
  // Made-up flat responses; the 2 kHz band runs 1778.28–2238.72 Hz (IEC 61260-1 edges).
  const file = (serial: string, bump: number) =>
    [`* ${serial}`, "Freq(Hz)\tSPL(dB)", ...Array.from({ length: 60 }, (_, k) => 1000 * 2 ** (k / 12)).map((hz) => `${hz.toFixed(1)}\t${(90 + (hz >= 1778.28 && hz < 2238.72 ? bump : 0)).toFixed(2)}`)].join("\n");
  await importResponseFiles(db, b.units.map((u, i) => ({ name: `${u.identity}.txt`, text: file(u.identity, i === 1 ? 1.43 : 0) })), { batchId: b.id, source: "upload" }, { id: lab });
  apart = { code: b.code, units: b.units.map((u) => u.identity) };
  client.close();

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

  test("a number of units that disagrees with the serials scanned is pointed out as you type, and refused", async () => {
    await visit(page, url("/lab/batches/new"));
    const form = page.getByTestId("batch-form");
    await form.getByLabel("Part type").selectOption("tweeter");
    await form.getByLabel("Maker's part number").fill("T-E2E-N");
    await form.getByLabel("Maker", { exact: true }).fill("A test maker");
    await form.getByLabel("Production or supplier lot").fill("LOT-E2E-N");
    await form.getByLabel("Makers’ serials (optional)").fill(["N1", "N2", "N3", "N4", "N5", "N6"].join("\n"));
    await expect.poll(() => page.getByTestId("maker-serials-count").textContent()).toBe("6 serials scanned: the batch will hold 6 units.");
    await form.getByLabel("Number of units").fill("5");
    await expect.poll(() => page.getByTestId("maker-serials-count").textContent()).toMatch(/^The number of units is 5, but 6 makers' serials are scanned/);
    await form.getByRole("button", { name: "Register batch" }).click();
    await expect.poll(() => form.getByText(/The number of units is 5, but 6 makers' serials are scanned/).count()).toBeGreaterThan(1);
    expect(new URL(page.url()).pathname).toBe("/lab/batches/new");
  });

  test("registers a batch of tweeters by scanning the makers' serials", async () => {
    await visit(page, url("/lab"));
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

  test("the lab's home lists the newest batches, and every batch is one link away", async () => {
    await visit(page, url("/lab"));
    await expect(page.getByTestId("lab-batches").textContent()).resolves.toContain(batch);
    await page.getByTestId("lab-every-batch-link").click();
    await page.getByTestId("lab-every-batch").waitFor();
    const rows = page.getByTestId("lab-batches").locator("tbody tr");
    // The demo's batches (more than the home shows) and this one.
    await expect(rows.count()).resolves.toBeGreaterThan(30);
    await rows.filter({ hasText: batch }).getByRole("link", { name: batch }).click();
    await page.getByTestId("batch-page").waitFor();
  });

  test("brings in four response files at once, matched by the maker's serial in the file name", async () => {
    const upload = page.getByTestId("response-upload");
    await upload.locator('input[type="file"]').setInputFiles(MAKER.map((m, i) => ({ name: `${m}.txt`, mimeType: "text/plain", buffer: Buffer.from(responseFile(LEVELS[i]!)) })));
    await upload.getByRole("button", { name: "Save 4 responses" }).click();
    await page.getByTestId("responses-saved").waitFor();
    await expect.poll(() => page.getByTestId("units-table").textContent()).not.toMatch(/awaiting/);
  });

  test("a parameters CSV with problems in several rows is refused as a whole, every problem listed at once", async () => {
    await page.getByRole("tab", { name: "Thiele–Small CSV" }).click();
    const csv = page.getByTestId("ts-csv-import");
    await csv.locator("textarea").fill(`serial,fs,qes,qms,re\n${MAKER[0]},900,1.1,2.2,4.7\nNOT-A-UNIT,900,1.1,2.2,4.7\n${MAKER[1]},abc,1.1,2.2,400`);
    await csv.getByRole("button", { name: "Save parameters" }).click();
    await page.getByTestId("ts-csv-problems").waitFor();
    await expect(page.getByTestId("ts-csv-problems").locator("li").allTextContents()).resolves.toEqual([
      "Line 3: NOT-A-UNIT is not a unit of this batch.",
      'Line 4: Fs "abc" is not a number.',
      `Line 4 (${MAKER[1]}): Re (Ω) must be between 0.5 and 100 Ω; 400 looks mistyped.`,
    ]);
  });

  test("sees the optimal plan, accepts it, and the reserved sets wait for assembly", async () => {
    await page.getByTestId("match-batch").click();
    await page.getByTestId("match-page").waitFor();
    await expect(page.getByTestId("plan-pairs").locator("tbody tr").count()).resolves.toBe(2);
    // Differences with their unit and the band by its name: "0.05 dB at 1.6 kHz (limit 0.5 dB)".
    await expect(page.getByTestId("plan-pairs").textContent()).resolves.toMatch(/Largest difference \(limit 0\.5 dB\)/);
    await expect(page.getByTestId("plan-pairs").locator("tbody tr").first().textContent()).resolves.toMatch(/\d\.\d\d dB RMS.*\d\.\d\d dB at \d+(\.\d+)? k?Hz/);
    // The charts load after the page (recharts stays out of its first load): wait for both.
    await expect.poll(() => page.getByTestId("pair-chart").count()).toBe(2);
    // The chart draws once it has measured its box: wait for its frequency ticks, each with its unit.
    await expect.poll(() => page.getByTestId("pair-chart").first().textContent()).toMatch(/2 kHz5 kHz10 kHz20 kHz/);
    await page.getByRole("button", { name: /Accept the plan/ }).click();
    await expect(page.getByTestId("plan-accepted").textContent()).resolves.toMatch(/2 matched sets reserved/);
    await visit(page, url("/lab"));
    await expect(page.getByTestId("lab-sets").textContent()).resolves.toContain(`M-${batch}-001`);
    // The set is in the register: a unit's page names its set and its partner.
    await page.getByTestId("lab-sets").locator("a").first().click();
    await expect(page.getByTestId("lab-origin").textContent()).resolves.toMatch(new RegExp(`Reserved in matched set M-${batch}-00\\d as the (left|right) unit, with D-TW-`));
  });

  test("matching is not offered for two units that cannot pair; the page says why, and the plan lists them as left over", async () => {
    await visit(page, url(`/lab/batches/${apart.code}`));
    await page.getByTestId("batch-page").waitFor();
    await expect(page.getByTestId("match-batch").count()).resolves.toBe(0);
    await expect(page.getByTestId("match-not-offered").textContent()).resolves.toContain(
      `No two of the 2 measured units are within the 0.5 dB limit: the closest two, ${apart.units[0]} and ${apart.units[1]}, differ by 1.43 dB at 2 kHz.`,
    );
    // The columns of the lab's batch table add up to its units.
    await expect(page.getByTestId("batch-counts").textContent()).resolves.toBe("0 waiting for measurement · 2 measured and free to match · 0 reserved in sets · 0 fitted in speakers · 0 failed");

    await visit(page, url(`/lab/match?batch=${apart.code}`));
    await expect(page.getByTestId("plan-nothing").textContent()).resolves.toContain("differ by 1.43 dB at 2 kHz");
    await expect(page.getByTestId("plan-single").textContent()).resolves.toMatch(/Left over, not paired \(2\).*no partner within 0\.5 dB: the closest, D-TW-.*, differs by 1\.43 dB at 2 kHz/);
    await expect(page.getByRole("button", { name: /Accept the plan/ }).count()).resolves.toBe(0);
  });
});
