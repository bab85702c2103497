import { rmSync, writeFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { finishes, models, users } from "@/db/schema";
import { moveAffected, raiseContainment } from "@/lib/containments";
import { paths } from "@/lib/paths";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

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
  const flitch = await receiveFlitch(db, { finishId: species.id, logReference: "LOG-ROUTE", supplier: "Route test", receivedOn: new Date().toISOString().slice(0, 10), leafThicknessMm: 0.6, leafCount: 16 }, { id: veneer!.id });
  const view = (await flitchView(db, flitch.identity))!;
  for (const l of view.leaves) await measureLeaf(db, l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneer!.id });
  const runs = [0, 4, 8, 12].map((s) => ({ left: [s + 1, s + 3], right: [s + 2, s + 4], reserve: [] }));
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

/** Fills the step form and records it; a refusal throws. `expectQuestion`: readings out of window, so the form asks first. */
async function record(page: Page, readings: Record<string, string>, expectQuestion = false) {
  const form = page.getByTestId("step-form");
  await form.waitFor();
  const title = await page.locator("h2", { hasText: "Next step:" }).textContent();
  for (const [label, value] of Object.entries(readings)) {
    const field = form.getByLabel(label, { exact: false });
    if ((await field.evaluate((el) => el.tagName)) === "SELECT") await field.selectOption(value);
    else await field.fill(value);
  }
  const before = page.url();
  await form.getByRole("button", { name: /^Record / }).click();
  // A record returns to the pair's page with what it recorded; a refusal or the question stays on the form.
  await expect.poll(async () => page.url() !== before || (await page.getByTestId("step-refused").count()) > 0 || (await page.getByTestId("step-confirm").count()) > 0, { timeout: 15_000 }).toBe(true);
  if (await page.getByTestId("step-refused").count()) throw new Error(`${title}: ${await page.getByTestId("step-refused").textContent()}`);
  if (expectQuestion) return;
  if (await page.getByTestId("step-confirm").count()) throw new Error(`${title}: asked ${await page.getByTestId("step-confirm").textContent()}`);
  await page.getByTestId("step-done").waitFor();
  // The page has moved on to the next step (or to the hold, or to the end of the route).
  await expect.poll(() => page.locator("h2", { hasText: "Next step:" }).first().textContent({ timeout: 500 }).catch(() => ""), { timeout: 15_000 }).not.toBe(title);
}

/** "14:05 on 3 Dec (UTC)" from a line that names a time. */
const minuteIn = (text: string | null) => /\d\d:\d\d on \d+ \w+( \d{4})? \(UTC\)/.exec(text ?? "")?.[0] ?? null;

describe("the cabinet route, walked by a cabinet user", () => {
  test("scans a cabinet label and walks the pair from the press to the hand finish as the clock moves", async () => {
    moveClock(0);
    const { pair, left } = made[0]!;
    await visit(cabinet, url("/cabinet"));
    await cabinet.getByTestId("scan-form").getByRole("textbox").fill(left.toLowerCase());
    await cabinet.getByTestId("scan-form").getByRole("button", { name: "Open" }).click();
    await cabinet.getByTestId("route-page").waitFor();
    await expect(cabinet.getByTestId("route-pair").textContent()).resolves.toBe(pair);
    await expect(cabinet.getByText(/platens are hot/).count()).resolves.toBeGreaterThan(0);

    await record(cabinet, { "Platen temperature": "137", "Time in the press": "22" });
    await record(cabinet, { "Trim deviation": "0.15" });
    await record(cabinet, { "Time under clamp": "120" });
    await expect(cabinet.getByTestId("step-done").textContent()).resolves.toBe("Recorded step 3, Brace fitting, for the left and right cabinets.");
    // Straight after the clamp: no step form, but why and the minute it is allowed from, the same
    // minute on the cabinets' cards, on the shop's home, and in the workshop's zone named on the page.
    const blocked = await cabinet.getByTestId("step-blocked").textContent();
    expect(blocked).toMatch(/^Not before \d\d:\d\d on \d+ \w+ \(UTC\): the left and right cabinets are on hold \(clamp 2 h and rest 2 h\) until then\.$/);
    await expect(cabinet.getByTestId("step-form").count()).resolves.toBe(0);
    const minute = minuteIn(blocked)!;
    await expect(cabinet.getByTestId("route-cabinets").textContent()).resolves.toContain(`Next step not before ${minute} (clamp 2 h and rest 2 h)`);
    await expect(cabinet.getByTestId("times-note").textContent()).resolves.toMatch(/^Times in UTC\./);
    await visit(cabinet, url("/cabinet"));
    // The home names the zone once for the page, not on every line.
    await expect(cabinet.getByTestId("station-sanding").textContent()).resolves.toContain(`on hold until ${minute.replace(" (UTC)", "")}`);
    await expect(cabinet.getByTestId("times-note").textContent()).resolves.toBe("Times in UTC.");
    await visit(cabinet, url(`/cabinet/pairs/${pair}`));

    let offset = 4 * HOUR + 60_000;
    moveClock(offset);
    await cabinet.reload();
    await expect(cabinet.getByTestId("step-blocked").count()).resolves.toBe(0);
    await record(cabinet, { "Finishing grit": "P240" });
    await record(cabinet, { "Inspector's check": "pass" });
    // Each coat waits for the one before: an hour after a stoved coat, 30 minutes after an air-dried one (default-spec.ts).
    const coat = { "Lacquer lot": "GL-E2E-B", "Wet film thickness": "100" };
    for (const n of [1, 2, 3, 4]) {
      await record(cabinet, { "Coat number": String(n), ...coat, "Oven temperature": "52" });
      moveClock((offset += HOUR + 60_000));
      await cabinet.reload();
    }
    await record(cabinet, { "Flatting grit": "P400" });
    for (const n of [5, 6, 7, 8]) {
      await record(cabinet, { "Coat number": String(n), ...coat });
      if (n === 5) {
        // Straight after an air-dried coat the next waits for the flash-off, said on the cabinets' cards.
        await expect(cabinet.getByTestId("route-cabinets").textContent()).resolves.toMatch(/Next coat not before \d\d:\d\d on \d+ \w+ \(UTC\) \(flash-off\)/);
      }
      if (n < 8) {
        moveClock((offset += 30 * 60_000 + 60_000));
        await cabinet.reload();
      }
    }

    moveClock(offset + 14 * DAY + 5 * 60_000);
    await cabinet.reload();
    await record(cabinet, { "Polishing cycle": "70" });
    await record(cabinet, { "Inspector's check": "pass" });
    await cabinet.getByTestId("step-form").getByRole("button", { name: /^Record / }).click();
    await cabinet.getByText(/Both cabinets have finished the route/).waitFor();
  });
});

describe("nonconformances, dispositioned by quality", () => {
  test("a press reading out of window is asked about once; confirmed, it holds the pair; quality accepts it and the pair goes on", async () => {
    moveClock(0);
    const { pair } = made[1]!;
    await visit(cabinet, url(`/cabinet/pairs/${pair}`));
    await record(cabinet, { "Platen temperature": "141", "Time in the press": "22" }, true);
    // Asked, with the readings kept; nothing is recorded yet.
    await expect(cabinet.getByTestId("step-confirm").textContent()).resolves.toContain("Platen temperature 141 °C is outside 135–140 °C: record it and open a nonconformance?");
    await expect(cabinet.getByTestId("step-form").getByLabel("Platen temperature", { exact: false }).inputValue()).resolves.toBe("141");
    await expect(cabinet.getByTestId("route-records").textContent()).resolves.toMatch(/No step recorded yet/);
    await cabinet.getByRole("button", { name: "Record it and open a nonconformance" }).click();
    await cabinet.getByTestId("step-done").waitFor();
    await expect(cabinet.getByTestId("step-done").textContent()).resolves.toMatch(/^Recorded step 1, Forming press, for the left and right cabinets\. A reading was out of its window: nonconformance NC-\d{4}-\d{3} holds the pair/);
    await expect(cabinet.getByTestId("route-hold").textContent()).resolves.toMatch(/NC-\d{4}-\d{3}, opened at step 1, Forming press \(Platen temperature 141 °C/);
    // On hold: no step form, and the reason in its place.
    await expect(cabinet.getByTestId("step-form").count()).resolves.toBe(0);
    await expect(cabinet.getByTestId("step-blocked").textContent()).resolves.toMatch(/^The pair is on hold: nonconformance NC-\d{4}-\d{3} is open\. Quality must disposition it first\.$/);

    await visit(quality, url("/quality"));
    // The newest open nonconformance is listed last.
    await expect(quality.getByTestId("open-ncs").textContent()).resolves.toMatch(/at step 1, Forming press: Platen temperature 141 °C/);
    const form = quality.locator('[data-testid^="disposition-NC"]').last();
    const code = (await form.getAttribute("data-testid"))!.replace("disposition-", "");
    await form.getByLabel("Disposition").selectOption("use_as_is");
    await form.getByLabel(/Reason for the deviation/).fill("1 °C over briefly; the bond tested sound");
    await form.getByRole("button", { name: /Record the disposition/ }).click();
    await quality.getByTestId("disposition-recorded").waitFor();
    await expect(quality.getByTestId("disposition-recorded").textContent()).resolves.toBe(`${code}: use as is (deviation approved). The pair is released.`);
    expect(new URL(quality.url()).pathname).toBe("/quality");
    await expect(quality.getByTestId("closed-ncs").textContent()).resolves.toMatch(/use as is/);

    await visit(cabinet, url(`/cabinet/pairs/${pair}`));
    await record(cabinet, { "Trim deviation": "0.05" });
  });

  test("quality scraps one cabinet: its partner is left unpartnered", async () => {
    const { pair, right } = made[2]!;
    await visit(cabinet, url(`/cabinet/pairs/${pair}`));
    await record(cabinet, { "Platen temperature": "152", "Time in the press": "22" }, true);
    await cabinet.getByRole("button", { name: "Record it and open a nonconformance" }).click();
    await cabinet.getByTestId("route-hold").waitFor();
    await visit(quality, url(`/cabinet/pairs/${pair}`));
    const form = quality.locator('[data-testid^="disposition-NC"]').first();
    await form.getByLabel("Disposition").selectOption("scrap");
    await form.getByLabel("Cabinet to scrap").selectOption("R");
    await form.getByLabel("Reason").fill("veneer blistered across the right side panel");
    await form.getByRole("button", { name: /Record the disposition/ }).click();
    // Back on the pair's page, which says what was recorded.
    await quality.getByTestId("disposition-recorded").waitFor();
    await expect(quality.getByTestId("disposition-recorded").textContent()).resolves.toMatch(new RegExp(`^NC-\\d{4}-\\d{3}: scrap the right cabinet ${right}\\. The pair is unpartnered until quality signs off a new partner\\.$`));
    await quality.getByTestId("unpartnered").waitFor();
    await quality.getByTestId("repartner-form").waitFor();
    await visit(quality, url(`/register/items/${right}`));
    await expect(quality.getByTestId("item-page").textContent()).resolves.toMatch(/scrapped/);
  });
});

describe("a containment's hold at the station", () => {
  test("the held pair's page names the containment and offers no step; once quality clears it, the form is back", async () => {
    const { pair, left } = made[3]!;
    const { client, db } = openDb(inject("databaseUrl"));
    try {
      const [q] = await db.select().from(users).where(eq(users.email, demoEmail("quality")));
      // Raised on the left cabinet: the pair that holds it is on hold.
      const raised = await raiseContainment(db, { target: left, reason: "Glue from a suspect drum: inspect the joints.", severity: "major" }, { id: q!.id });
      await visit(cabinet, url(paths.cabinetPair(pair)));
      const hold = cabinet.getByTestId("containment-hold");
      await hold.waitFor();
      await expect(hold.textContent()).resolves.toMatch(new RegExp(`on hold until quality releases it.*Containment ${raised.code}.*Glue from a suspect drum`));
      await expect(hold.getByRole("link", { name: raised.code }).getAttribute("href")).resolves.toBe(paths.containment(raised.code));
      await cabinet.getByTestId("step-held").waitFor();
      expect(await cabinet.getByTestId("step-form").count()).toBe(0);

      await moveAffected(db, { code: raised.code, serials: raised.affected.map((a) => a.identity), to: "cleared" }, { id: q!.id });
      await visit(cabinet, url(paths.cabinetPair(pair)));
      await cabinet.getByTestId("step-form").waitFor();
      expect(await cabinet.getByTestId("containment-hold").count()).toBe(0);
    } finally {
      client.close();
    }
  });
});
