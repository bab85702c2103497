/**
 * One pair's whole journey after its cabinets and parts are ready: an assembly user builds it from
 * its matched sets, the lab passes its final test, a packer prints its certificate and carton
 * label and ships it, the dealer's e-mail arrives in the stand-in SMTP server with the PDF, and a
 * signed-out browser opens the certificate's verification link. The parts are prepared through the
 * stations' own code in the test process; everything after that happens in the browser. Invented data.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import { simpleParser } from "mailparser";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { certificates, dealers, finishes, items, models, users } from "@/db/schema";
import { setClock } from "@/lib/clock";
import { acceptCrossoverPlan, buildCrossover } from "@/lib/lab/crossovers";
import { acceptPlan, importResponseFiles, registerBatch } from "@/lib/lab/units";
import { pairRoute, recordStep } from "@/lib/route/pair-route";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { demoEmail, launchBrowser, newPage, pressPrint, signIn, url, waitForMail, visit } from "./browser-helpers";
import { goodReadings } from "../fixtures/route";

let browser: Browser;
const w = { pair: "", flitch: "", tweeter: [] as string[], bass: [] as string[], xo: [] as string[] };


/** A made-up flat response from 20 Hz to 20 kHz, 1/12 octave apart, with the unit's serial on line 1. */
const flat = (serial: string, level = 90) => [`* ${serial}`, "Freq(Hz) SPL(dB)", ...Array.from({ length: 121 }, (_, k) => `${(20 * 2 ** (k / 12)).toFixed(2)}\t${level}`)].join("\n");

beforeAll(async () => {
  const { client, db } = openDb(inject("databaseUrl"));
  const id = async (role: string) => (await db.select().from(users).where(eq(users.email, demoEmail(role))))[0]!.id;
  const [veneer, cabinet, lab] = [await id("veneer"), await id("cabinet"), await id("lab")];
  const pw2 = (await db.select().from(models)).find((m) => m.code === "PW2")!;
  const species = (await db.select().from(finishes)).find((f) => f.kind === "veneer")!;
  const today = new Date().toISOString().slice(0, 10);
  const flitch = await receiveFlitch(db, { finishId: species.id, logReference: "LOG-JOURNEY", supplier: "Journey test", receivedOn: today, leafThicknessMm: 0.6, leafCount: 4 }, { id: veneer });
  w.flitch = flitch.identity;
  for (const l of (await flitchView(db, flitch.identity))!.leaves) await measureLeaf(db, l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneer });
  const [made] = await confirmRuns(db, { flitchId: flitch.id, modelId: pw2.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: veneer });
  w.pair = made!.pair.identity;
  let t = Date.now() - 30 * 86_400_000;
  for (const s of (await pairRoute(db, made!.pair)).spec.steps) {
    setClock(new Date(t));
    await recordStep(db, { pairId: made!.pair.id, seq: s.seq, sides: ["L", "R"], startedAt: new Date(t), readings: goodReadings(s.key) }, { id: cabinet });
    t += s.holdAfter && s.holdAfter.minutes > 240 ? 15 * 86_400_000 : 5 * 3_600_000;
  }
  setClock(null);
  for (const partType of ["tweeter", "bass"] as const) {
    const b = await registerBatch(db, { partType, partNumber: `${partType}-JOURNEY`, maker: "Invented maker", lot: "L-J", receivedOn: today, makerSerials: [], count: 2 }, { id: lab });
    await importResponseFiles(db, b.units.map((u) => ({ name: `${u.identity}.txt`, text: flat(u.identity) })), { batchId: b.id, source: "upload" }, { id: lab });
    await acceptPlan(db, { batchId: b.id, modelId: pw2.id, pairs: [{ a: b.units[0]!.identity, b: b.units[1]!.identity }] }, { id: lab });
    w[partType] = b.units.map((u) => u.identity);
  }
  const parts = [{ position: "C1", lot: "LOT-JOURNEY-C47", partNumber: "PP-475", nominal: "4.7µF", tolerance: "J", reading: "4.71µF" }];
  // Boards are measured and paired in a set before assembly fits them (lib/assembly/checks.ts).
  for (let i = 0; i < 2; i++) w.xo.push((await buildCrossover(db, { modelId: pw2.id, parts, response: { name: `xo-${i}.txt`, text: flat(`xo-${i}`) } }, { id: lab })).crossover.identity);
  await acceptCrossoverPlan(db, { modelId: pw2.id, limitDb: 0.5, pairs: [{ a: w.xo[0]!, b: w.xo[1]! }] }, { id: lab });
  client.close();
  browser = await launchBrowser();
});
afterAll(async () => {
  setClock(null);
  await browser?.close();
});

async function as(role: string): Promise<Page> {
  const page = await newPage(browser);
  await signIn(page, demoEmail(role));
  return page;
}

describe("a pair from matched parts to a shipped carton, in the browser", () => {
  let carton = "";

  test("assembly builds the speakers from the pair's matched sets", async () => {
    const page = await as("assembly");
    await visit(page, url(`/assembly/${w.pair}`));
    await page.getByTestId("build-form").waitFor();
    const scan = async (key: string, code: string) => {
      await page.getByTestId(`scan-${key}`).fill(code);
      await page.getByTestId(`scan-${key}`).press("Enter");
      await expect.poll(() => page.getByTestId(`result-${key}`).textContent()).toContain(`✓ ${code}`);
    };
    await scan("L.T", w.tweeter[0]!);
    await scan("R.T", w.tweeter[1]!);
    await scan("L.B", w.bass[0]!);
    await scan("R.B", w.bass[1]!);
    await scan("L.XO", w.xo[0]!);
    await scan("R.XO", w.xo[1]!);
    await page.getByLabel("Both speakers cleaned: no dust, flux or fingerprints").check();
    await page.getByLabel(/Final inspection done/).check();
    await page.getByTestId("build-submit").click();
    await page.getByTestId("built-speakers").waitFor();
    await page.context().close();
  });

  test("the lab passes its final test", async () => {
    const page = await as("lab");
    await visit(page, url(`/lab/final-test?pair=${w.pair}`));
    await page.getByTestId("final-left").setInputFiles({ name: "left.txt", mimeType: "text/plain", buffer: Buffer.from(flat("left", 88)) });
    await page.getByTestId("final-right").setInputFiles({ name: "right.txt", mimeType: "text/plain", buffer: Buffer.from(flat("right", 88.4)) });
    await page.getByRole("button", { name: "Compare left and right" }).click();
    await expect(page.getByTestId("final-test-result").textContent()).resolves.toMatch(/^Passed: the largest difference is 0\.40 dB/);
    await page.getByTestId("final-test-bands").waitFor();
    await page.context().close();
  });

  test("a packer packs it, prints its certificate and carton label, and ships it; the dealer's e-mail carries the certificate", async () => {
    const page = await as("packing");
    await visit(page, url(`/packing/pack/${w.pair}`));
    // Both speakers scanned in from their labels (read here off the page), the rest ticked.
    await page.getByTestId("scan-left").fill((await page.getByTestId("pair-left").textContent())!.trim());
    await page.getByTestId("scan-right").fill((await page.getByTestId("pair-right").textContent())!.trim());
    const coded = page.locator('input[data-scan-box][name="scan"]');
    for (let i = 0; i < (await coded.count()); i++) {
      const hint = await coded.nth(i).evaluate((el) => document.getElementById(el.getAttribute("aria-describedby")!.split(" ")[0]!)!.textContent!);
      await coded.nth(i).fill(hint.replace(/^Code /, ""));
    }
    const boxes = page.getByTestId("pack-item");
    for (let i = 0; i < (await boxes.count()); i++) await boxes.nth(i).check();
    await page.getByLabel("Storage location").fill("Rack J, shelf 2");
    await page.getByTestId("pack-submit").click();
    await page.getByTestId("packed").waitFor();
    carton = (await page.getByTestId("packed-carton").textContent())!.trim();

    const certificate = await pressPrint(page, "print-certificate");
    expect(certificate.headers()["content-type"]).toBe("application/pdf");
    expect((await certificate.body()).subarray(0, 5).toString()).toBe("%PDF-");
    const label = await pressPrint(page, "print-carton-label");
    expect((await label.body()).subarray(0, 5).toString()).toBe("%PDF-");

    const { client, db } = openDb(inject("databaseUrl"));
    const [dealer] = await db.select().from(dealers).limit(1);
    client.close();
    const tracking = `J-${Date.now().toString(36).toUpperCase()}`;
    await visit(page, url("/packing"));
    const form = page.getByTestId("ship-form");
    await form.locator(`input[name="cartons"][value="${carton}"]`).check();
    await form.getByLabel("Dealer").selectOption(dealer!.id);
    await form.getByLabel("Carrier").fill("Invented Carriers");
    await form.getByLabel("Tracking number").fill(tracking);
    await form.getByRole("button", { name: /^Ship 1 carton$/ }).click();
    await page.getByTestId("shipped").waitFor();

    const message = await waitForMail(dealer!.email, new RegExp(`tracking ${tracking}$`));
    expect(message.text).toContain(w.pair);
    const raw = await simpleParser(readFileSync(join(inject("mailboxDir"), message.id)));
    expect(raw.attachments.map((a) => a.filename)).toEqual([expect.stringMatching(/^delivery-note-H-.+\.pdf$/), `certificate-${w.pair}.pdf`]);
    for (const a of raw.attachments) expect(a.content.subarray(0, 5).toString()).toBe("%PDF-");
    await page.context().close();
  });

  test("a signed-out browser opens the verification link and sees the pair is genuine", async () => {
    const { client, db } = openDb(inject("databaseUrl"));
    const [row] = await db.select({ code: certificates.code }).from(certificates).innerJoin(items, eq(items.id, certificates.pairId)).where(eq(items.identity, w.pair));
    client.close();
    const context = await browser.newContext();
    const phone = await context.newPage();
    const res = await visit(phone, url(`/verify/${row!.code}`));
    expect(res?.status()).toBe(200);
    await expect(phone.getByTestId("verify-genuine").textContent()).resolves.toMatch(/genuine/);
    await expect(phone.getByTestId("verify-pair").textContent()).resolves.toBe(w.pair);
    await context.close();
  });
});
