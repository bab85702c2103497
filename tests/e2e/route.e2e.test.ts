import { rmSync, writeFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { finishes, models, users } from "@/db/schema";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { demoEmail, launchBrowser, newPage, signIn, url } from "./browser-helpers";

let browser: Browser;
let cabinet: Page;
let quality: Page;
const made: { pair: string; left: string; right: string }[] = [];

const HOUR = 3600_000;
const DAY = 24 * HOUR;
/** Moves the app's clock (lib/clock.ts reads this file in the test server) by an offset from real time. */
const moveClock = (ms: number) => writeFileSync(inject("clockFile"), `+${ms}`);

beforeAll(async () => {
  // Three veneered pairs from a new flitch, made through the veneer room's own code.
  const { client, db } = openDb(inject("databaseUrl"));
  const [veneer] = await db.select().from(users).where(eq(users.email, demoEmail("veneer")));
  const species = (await db.select().from(finishes)).find((f) => f.kind === "veneer")!;
  const model = (await db.select().from(models)).find((m) => m.leavesPerFace === 2)!;
  const flitch = await receiveFlitch(db, { finishId: species.id, logReference: "LOG-ROUTE", supplier: "Route test", receivedOn: new Date().toISOString().slice(0, 10), leafThicknessMm: 0.6, leafCount: 12 }, { id: veneer!.id });
  const view = (await flitchView(db, flitch.identity))!;
  for (const l of view.leaves) await measureLeaf(db, l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneer!.id });
  const runs = [0, 4, 8].map((s) => ({ left: [s + 1, s + 3], right: [s + 2, s + 4], reserve: [] }));
  for (const m of await confirmRuns(db, { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs }, { id: veneer!.id })) {
    made.push({ pair: m.pair.identity, left: m.left.identity, right: m.right.identity });
  }
  client.close();
  browser = await launchBrowser();
  cabinet = await newPage(browser);
  await signIn(cabinet, demoEmail("cabinet"));
  quality = await newPage(browser);
  await signIn(quality, demoEmail("quality"));
});
afterAll(async () => {
  rmSync(inject("clockFile"), { force: true });
  await browser?.close();
});

async function record(page: Page, readings: Record<string, string>, expectNc = false) {
  const form = page.getByTestId("step-form");
  await form.waitFor();
  const title = await page.locator("h2", { hasText: "Next step:" }).textContent();
  for (const [label, value] of Object.entries(readings)) {
    const field = form.getByLabel(label, { exact: false });
    if ((await field.evaluate((el) => el.tagName)) === "SELECT") await field.selectOption(value);
    else await field.fill(value);
  }
  await form.getByRole("button", { name: /^Record / }).click();
  await expect.poll(async () => (await page.getByTestId("step-done").count()) > 0 || (await page.getByTestId("step-refused").count()) > 0).toBe(true);
  if (await page.getByTestId("step-refused").count()) throw new Error(`${title}: ${await page.getByTestId("step-refused").textContent()}`);
  if (!expectNc) await expect.poll(() => page.locator("h2", { hasText: "Next step:" }).first().textContent().catch(() => "")).not.toBe(title);
}

describe("the cabinet route, walked by a cabinet user", () => {
  test("scans a cabinet label and walks the pair from the press to the hand finish as the clock moves", async () => {
    moveClock(0);
    const { pair, left } = made[0]!;
    await cabinet.goto(url("/cabinet"));
    await cabinet.getByTestId("scan-form").getByRole("textbox").fill(left.toLowerCase());
    await cabinet.getByTestId("scan-form").getByRole("button", { name: "Open" }).click();
    await cabinet.getByTestId("route-page").waitFor();
    await expect(cabinet.getByTestId("route-pair").textContent()).resolves.toBe(pair);
    await expect(cabinet.getByText(/platens are hot/).count()).resolves.toBeGreaterThan(0);

    await record(cabinet, { "Platen temperature": "137", "Time in the press": "22" });
    await record(cabinet, { "Trim deviation": "0.15" });
    await record(cabinet, { "Time under clamp": "120" });
    // Straight after the clamp: the next step is refused with the time it becomes allowed.
    await cabinet.getByTestId("step-form").getByRole("button", { name: /^Record / }).click();
    await expect(cabinet.getByTestId("step-refused").textContent()).resolves.toMatch(/^Not before/);

    moveClock(4 * HOUR + 60_000);
    await cabinet.reload();
    await record(cabinet, {});
    await record(cabinet, { "Inspector's check": "pass" });
    for (const n of [1, 2, 3, 4]) await record(cabinet, { "Coat number": String(n) });
    await record(cabinet, {});
    for (const n of [5, 6, 7, 8]) await record(cabinet, { "Coat number": String(n) });

    moveClock(4 * HOUR + 14 * DAY + 5 * 60_000);
    await cabinet.reload();
    await record(cabinet, { "Polishing cycle": "70" });
    await record(cabinet, { "Inspector's check": "pass" });
    await cabinet.getByTestId("step-form").getByRole("button", { name: /^Record / }).click();
    await cabinet.getByText(/Both cabinets have finished the route/).waitFor();
  });
});

describe("nonconformances, dispositioned by quality", () => {
  test("a press reading out of window holds the pair; quality accepts it as a deviation and the pair goes on", async () => {
    moveClock(0);
    const { pair } = made[1]!;
    await cabinet.goto(url(`/cabinet/pairs/${pair}`));
    await record(cabinet, { "Platen temperature": "141", "Time in the press": "22" }, true);
    await expect(cabinet.getByTestId("step-done").textContent()).resolves.toMatch(/nonconformance NC-/);
    await cabinet.reload();
    await expect(cabinet.getByTestId("route-hold").textContent()).resolves.toMatch(/Platen temperature 141 °C/);

    await quality.goto(url("/quality"));
    // The newest open nonconformance is listed last.
    const form = quality.locator('[data-testid^="disposition-"]').last();
    await form.getByLabel("Disposition").selectOption("use_as_is");
    await form.getByLabel(/Reason for the deviation/).fill("1 °C over briefly; the bond tested sound");
    await form.getByRole("button", { name: /Record the disposition/ }).click();
    await expect.poll(() => quality.getByTestId("closed-ncs").textContent()).toMatch(/use as is/);

    await cabinet.goto(url(`/cabinet/pairs/${pair}`));
    await record(cabinet, { "Trim deviation": "0.05" });
  });

  test("quality scraps one cabinet: its partner is left unpartnered", async () => {
    const { pair, right } = made[2]!;
    await cabinet.goto(url(`/cabinet/pairs/${pair}`));
    await record(cabinet, { "Platen temperature": "152", "Time in the press": "22" }, true);
    await quality.goto(url(`/cabinet/pairs/${pair}`));
    const form = quality.locator('[data-testid^="disposition-"]').first();
    await form.getByLabel("Disposition").selectOption("scrap");
    await form.getByLabel("Cabinet to scrap").selectOption("R");
    await form.getByLabel("Reason").fill("veneer blistered across the right side panel");
    await form.getByRole("button", { name: /Record the disposition/ }).click();
    await quality.getByTestId("unpartnered").waitFor();
    await quality.getByTestId("repartner-form").waitFor();
    await quality.goto(url(`/register/items/${right}`));
    await expect(quality.getByTestId("item-page").textContent()).resolves.toMatch(/scrapped/);
  });
});
