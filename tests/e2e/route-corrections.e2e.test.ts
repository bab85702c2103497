/**
 * A coat recorded with its lacquer lot, oven temperature and film; the film mistyped (1000 µm for
 * 100 µm) opens a nonconformance; the cabinet shop corrects it with a reason, and quality closes
 * the nonconformance as an entry error. Windows: lib/route/default-spec.ts (common practice).
 */
import { rmSync, writeFileSync } from "node:fs";
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { finishes, models, users } from "@/db/schema";
import { atTime } from "@/lib/clock";
import { paths } from "@/lib/paths";
import { defaultRoute } from "@/lib/route/default-spec";
import { recordStep } from "@/lib/route/pair-route";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { goodReadings } from "../fixtures/route";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
let cabinet: Page;
let quality: Page;
let pair = "";
const HOUR = 3600_000;

beforeAll(async () => {
  // The app's clock is the real one for this file.
  writeFileSync(inject("clockFile"), "+0");
  const { client, db } = openDb(inject("databaseUrl"));
  const [veneer] = await db.select().from(users).where(eq(users.email, demoEmail("veneer")));
  const [cab] = await db.select().from(users).where(eq(users.email, demoEmail("cabinet")));
  const species = (await db.select().from(finishes)).find((f) => f.kind === "veneer")!;
  const model = (await db.select().from(models)).find((m) => m.leavesPerFace === 2)!;
  const flitch = await receiveFlitch(db, { finishId: species.id, logReference: "LOG-CORR", supplier: "Correction test", receivedOn: new Date().toISOString().slice(0, 10), leafThicknessMm: 0.6, leafCount: 4 }, { id: veneer!.id });
  const view = (await flitchView(db, flitch.identity))!;
  for (const l of view.leaves) await measureLeaf(db, l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneer!.id });
  const [made] = await confirmRuns(db, { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: veneer!.id });
  pair = made!.pair.identity;
  // The steps before the first coat, hours ago, so no hold stands now.
  // Hours ago each started (the brace's 4 h hold is over before sanding starts).
  const hoursAgo: Record<string, number> = { press: 14, trim: 13, brace: 12, sanding: 7, "check-sanding": 6 };
  for (const s of defaultRoute().filter((x) => x.key in hoursAgo)) {
    const t = new Date(Date.now() - hoursAgo[s.key]! * HOUR);
    await atTime(t, () => recordStep(db, { pairId: made!.pair.id, seq: s.seq, sides: ["L", "R"], startedAt: t, readings: goodReadings(s.key) }, { id: cab!.id }));
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

describe("correcting a mistyped film reading", () => {
  test("the coat's slip opens a nonconformance; corrected, quality closes it as an entry error", async () => {
    await visit(cabinet, url(paths.cabinetPair(pair)));
    const form = cabinet.getByTestId("step-form");
    await form.waitFor();
    await expect(cabinet.locator("h2", { hasText: "Next step:" }).textContent()).resolves.toContain("Lacquer coat 1, stoved");
    await form.getByLabel("Lacquer lot").fill("GL-E2E-C7");
    await form.getByLabel("Oven temperature", { exact: false }).fill("52");
    await form.getByLabel("Wet film thickness", { exact: false }).fill("1000");
    await form.getByRole("button", { name: /^Record / }).click();
    await cabinet.getByTestId("step-confirm").waitFor();
    await expect(cabinet.getByTestId("step-confirm").textContent()).resolves.toContain("Wet film thickness 1000 µm is outside 80–120 µm: record it and open a nonconformance?");
    await cabinet.getByRole("button", { name: "Record it and open a nonconformance" }).click();
    await cabinet.getByTestId("step-done").waitFor();
    const hold = (await cabinet.getByTestId("route-hold").textContent())!;
    const code = /NC-\d{4}-\d{3}/.exec(hold)![0];
    await expect(cabinet.getByTestId("route-records").textContent()).resolves.toContain("Lacquer lot: GL-E2E-C7 · Oven temperature: 52 °C · Wet film thickness: 1000 µm");

    // The cabinet shop corrects its own slip, with the reason.
    const correction = cabinet.getByTestId("correction-form");
    await expect(correction.getByLabel("Recorded step").locator("option:checked").textContent()).resolves.toMatch(/^Step 6, Lacquer coat 1, stoved/);
    await correction.getByLabel("Wet film thickness", { exact: false }).fill("100");
    await correction.getByLabel("Why it is corrected").fill("Typed 1000 for 100: the wet film comb read 100 µm.");
    await correction.getByRole("button", { name: "Correct the reading" }).click();
    await cabinet.getByTestId("correction-done").waitFor();
    await expect(cabinet.getByTestId("correction-done").textContent()).resolves.toBe(`Corrected wet film thickness. Every reading of the step is inside its window now: quality may close ${code} as an entry error.`);
    // The original struck through beside the correction, with who and why.
    const row = cabinet.locator('[data-testid^="correction-"]').filter({ hasText: "Why:" }).first();
    await expect(row.textContent()).resolves.toMatch(/Corrected .* by .*: Wet film thickness 1000 µm → 100 µm\. Why: Typed 1000 for 100: the wet film comb read 100 µm\./);
    await expect(row.locator("del").textContent()).resolves.toBe("1000 µm");
    // Still on hold until quality closes it.
    await cabinet.getByTestId("route-hold").waitFor();

    await visit(quality, url(paths.quality));
    const dispo = quality.getByTestId(`disposition-${code}`);
    await expect(dispo.getByTestId(`entry-error-${code}`).textContent()).resolves.toContain("Wet film thickness 1000 µm → 100 µm");
    await dispo.getByLabel("Disposition").selectOption("entry_error");
    await dispo.getByLabel(/Why it was only a typing slip/).fill("Film comb read 100 µm; 1000 was a typing slip, now corrected.");
    await dispo.getByRole("button", { name: /Record the disposition/ }).click();
    await quality.getByTestId("disposition-recorded").waitFor();
    await expect(quality.getByTestId("disposition-recorded").textContent()).resolves.toBe(`${code}: closed as an entry error (the reading was mistyped and has been corrected). The pair is released.`);

    // The pair goes on: coat 2 waits for coat 1's stoving, said on the page.
    await visit(cabinet, url(paths.cabinetPair(pair)));
    await expect(cabinet.getByTestId("route-hold").count()).resolves.toBe(0);
    await expect(cabinet.getByTestId("route-cabinets").textContent()).resolves.toMatch(/Next coat not before \d\d:\d\d on \d+ \w+ \(UTC\) \(stoving 30 min, then cool-down\)/);
  });
});
