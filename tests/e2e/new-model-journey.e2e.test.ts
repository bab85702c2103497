/**
 * A model the workshop adds itself, from the admin's form to a shipped carton: the admin registers
 * a two-way model with a top housing as its trim part; a flitch is cut into a pair of it, the
 * cabinets walk their route, the trim parts arrive in a supplier's lot and walk theirs, the drive
 * units and boards are matched (all through the stations' own code, steps dated in the past); then,
 * in the browser, assembly fits every part including the trim, the lab passes the final test, and
 * the packer scans the carton in and ships it. The dealer's e-mail carries the delivery note, read
 * back with unpdf. The model, the lot and every serial are the test's own, invented.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { eq } from "drizzle-orm";
import { simpleParser } from "mailparser";
import type { Browser, Page } from "playwright-core";
import { extractText, getDocumentProxy } from "unpdf";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { dealers, finishes, items, models, users, type Item } from "@/db/schema";
import { setClock } from "@/lib/clock";
import { acceptCrossoverPlan, buildCrossover } from "@/lib/lab/crossovers";
import { acceptPlan, importResponseFiles, registerBatch } from "@/lib/lab/units";
import { paths } from "@/lib/paths";
import { recordStep, routeOf } from "@/lib/route/pair-route";
import { receiveTrimParts } from "@/lib/trim/receive";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { demoEmail, launchBrowser, newPage, signIn, url, visit, waitForMail } from "./browser-helpers";
import { goodReadings } from "../fixtures/route";

const DAY = 86_400_000;
const HOUR = 3_600_000;
// After the demo's codes in the pickers' order, so other files that take the first model still get a demo one.
const CODE = "RN2";
/** A GTIN-14 in the demo's invented company prefix, its check digit worked by the GS1 mod-10 rule (docs/REFERENCES.md, § GS1). */
const GTIN = "09527730004203";

let browser: Browser;
const w = { pair: "", T: [] as string[], B: [] as string[], xo: [] as string[], top: [] as string[] };

/** A made-up flat response from 20 Hz to 20 kHz, 1/12 octave apart, with the unit's serial on line 1. */
const flat = (serial: string, level = 90) => [`* ${serial}`, "Freq(Hz) SPL(dB)", ...Array.from({ length: 121 }, (_, k) => `${(20 * 2 ** (k / 12)).toFixed(2)}\t${level}`)].join("\n");

/** The good readings of a trim step (inside the default trim route's windows). */
function trimReadings(key: string): Record<string, string | boolean> {
  if (key.startsWith("trim-paint-")) return { coat: key.slice("trim-paint-".length) };
  if (key === "trim-film") return { filmUm: "85" };
  if (key.includes("check") || key === "trim-inspection") return { pass: true };
  return {};
}

async function as(role: string): Promise<Page> {
  const page = await newPage(browser);
  await signIn(page, demoEmail(role));
  return page;
}

beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  setClock(null);
  await browser?.close();
});

describe("a model the admin adds, from flitch to shipment", () => {
  test("the admin registers the model with a top housing as its trim part", async () => {
    const page = await as("admin");
    await visit(page, url(paths.adminModels));
    await page.getByTestId("new-model").click();
    const form = page.getByTestId("model-form");
    await form.waitFor();
    await page.getByTestId("model-code").fill(CODE);
    await page.getByTestId("model-name").fill("Rookmere Two");
    await form.getByLabel("Smallest leaf length (mm)").fill("600");
    await form.getByLabel("Smallest leaf width (mm)").fill("200");
    await page.getByTestId("model-gtin").fill(GTIN);
    await page.getByTestId("add-trim").click();
    await page.getByTestId("trim-position-0").fill("TOP");
    await page.getByTestId("trim-label-0").fill("Top housing");
    await form.getByRole("button", { name: "Register the model" }).click();
    await page.waitForURL(new RegExp(`/admin/models/${CODE}$`));
    await page.getByTestId("model-version-1").waitFor();
    await page.context().close();
  });

  test("its parts are made and matched at the stations", async () => {
    const { client, db } = openDb(inject("databaseUrl"));
    const id = async (role: string) => (await db.select().from(users).where(eq(users.email, demoEmail(role))))[0]!.id;
    const [veneer, cabinet, lab] = [await id("veneer"), await id("cabinet"), await id("lab")];
    const model = (await db.select().from(models).where(eq(models.code, CODE)))[0]!;
    expect(model.pairGtin).toBe(GTIN);
    const species = (await db.select().from(finishes)).find((f) => f.kind === "veneer")!;
    const today = new Date().toISOString().slice(0, 10);

    // A flitch cut into one pair of the new model (two leaves a face), its cabinets along their route.
    const flitch = await receiveFlitch(db, { finishId: species.id, logReference: "LOG-NEW-MODEL", supplier: "New model test", receivedOn: today, leafThicknessMm: 0.6, leafCount: 4 }, { id: veneer });
    for (const l of (await flitchView(db, flitch.identity))!.leaves) await measureLeaf(db, l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneer });
    const [made] = await confirmRuns(db, { flitchId: flitch.id, modelId: model.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: veneer });
    w.pair = made!.pair.identity;
    let t = Date.now() - 40 * DAY;
    const cabinetSteps = (await routeOf(db, made!.pair)).spec.steps;
    for (const s of cabinetSteps) {
      setClock(new Date(t));
      await recordStep(db, { pairId: made!.pair.id, seq: s.seq, sides: ["L", "R"], startedAt: new Date(t), readings: goodReadings(s.key) }, { id: cabinet });
      t += s.holdAfter && s.holdAfter.minutes > 240 ? 15 * DAY : 5 * HOUR;
    }

    // Two top housings in one supplier's lot, each along the model's own trim route.
    const received = await receiveTrimParts(db, { modelId: model.id, position: "TOP", supplier: "Invented Metalworks", lotCode: "IMW-RN2-01", count: 2 }, { id: cabinet });
    w.top = received.parts.map((p) => p.identity);
    for (const identity of w.top) {
      const part = (await db.select().from(items).where(eq(items.identity, identity)))[0] as Item;
      const route = await routeOf(db, part);
      expect(route.spec.routeKind).toBe("trim");
      let at = Date.now() - 10 * DAY;
      for (const s of route.spec.steps) {
        setClock(new Date(at));
        await recordStep(db, { pairId: part.id, seq: s.seq, sides: ["L"], startedAt: new Date(at), readings: trimReadings(s.key) }, { id: cabinet });
        at += s.holdAfter ? s.holdAfter.minutes * 60_000 + HOUR : HOUR;
      }
    }
    setClock(null);

    // The model's drive units (a tweeter and a bass unit a side) and its boards, matched in pairs.
    for (const [partType, key] of [["tweeter", "T"], ["bass", "B"]] as const) {
      const b = await registerBatch(db, { partType, partNumber: `${partType}-RN2`, maker: "Invented maker", lot: "L-RN2", receivedOn: today, makerSerials: [], count: 2 }, { id: lab });
      await importResponseFiles(db, b.units.map((u) => ({ name: `${u.identity}.txt`, text: flat(u.identity) })), { batchId: b.id, source: "upload" }, { id: lab });
      await acceptPlan(db, { batchId: b.id, modelId: model.id, pairs: [{ a: b.units[0]!.identity, b: b.units[1]!.identity }] }, { id: lab });
      w[key] = b.units.map((u) => u.identity);
    }
    const parts = [{ position: "C1", lot: "LOT-RN2-C47", partNumber: "PP-475", nominal: "4.7µF", tolerance: "J", reading: "4.71µF" }];
    for (let i = 0; i < 2; i++) w.xo.push((await buildCrossover(db, { modelId: model.id, parts, response: { name: `xo-nm${i}.txt`, text: flat(`xo-nm${i}`) } }, { id: lab })).crossover.identity);
    await acceptCrossoverPlan(db, { modelId: model.id, limitDb: 0.5, pairs: [{ a: w.xo[0]!, b: w.xo[1]! }] }, { id: lab });
    client.close();
  });

  test("assembly fits the drive units, the boards and the top housings by scan", async () => {
    const page = await as("assembly");
    await visit(page, url(`/assembly/${encodeURIComponent(w.pair)}`));
    await page.getByTestId("build-form").waitFor();
    const scan = async (key: string, code: string) => {
      await page.getByTestId(`scan-${key}`).fill(code);
      await page.getByTestId(`scan-${key}`).press("Enter");
      await expect.poll(() => page.getByTestId(`result-${key}`).textContent()).toContain(`✓ ${code}`);
    };
    for (const [i, side] of (["L", "R"] as const).entries()) {
      await scan(`${side}.T`, w.T[i]!);
      await scan(`${side}.B`, w.B[i]!);
      await scan(`${side}.XO`, w.xo[i]!);
      await scan(`${side}.TOP`, w.top[i]!);
    }
    await page.getByLabel("Both speakers cleaned: no dust, flux or fingerprints").check();
    await page.getByLabel(/Final inspection done/).check();
    await page.getByTestId("build-submit").click();
    await page.getByTestId("built-speakers").waitFor();
    await expect.poll(() => page.getByTestId("built-speakers").textContent()).toMatch(new RegExp(`Left speaker:\\s*S-${CODE}-.*Right speaker:\\s*S-${CODE}-`));
    await page.context().close();
  });

  test("the lab passes its final test", async () => {
    const page = await as("lab");
    await visit(page, url(`/lab/final-test?pair=${w.pair}`));
    await page.getByTestId("final-left").setInputFiles({ name: "left.txt", mimeType: "text/plain", buffer: Buffer.from(flat("left", 88)) });
    await page.getByTestId("final-right").setInputFiles({ name: "right.txt", mimeType: "text/plain", buffer: Buffer.from(flat("right", 88.3)) });
    await page.getByRole("button", { name: "Compare left and right" }).click();
    await expect(page.getByTestId("final-test-result").textContent()).resolves.toMatch(/^Passed/);
    await page.context().close();
  });

  test("the packer scans the carton in and ships it; the dealer's delivery note names its SSCC and the pair", async () => {
    const page = await as("packing");
    await visit(page, url(`/packing/pack/${w.pair}`));
    await page.getByTestId("scan-left").fill((await page.getByTestId("pair-left").textContent())!.trim());
    await page.getByTestId("scan-right").fill((await page.getByTestId("pair-right").textContent())!.trim());
    const boxes = page.getByTestId("pack-item");
    for (let i = 0; i < (await boxes.count()); i++) await boxes.nth(i).check();
    await page.getByLabel("Storage location").fill("Rack N, shelf 1");
    await page.getByTestId("pack-submit").click();
    await page.getByTestId("packed").waitFor();
    const carton = (await page.getByTestId("packed-carton").textContent())!.trim();
    const sscc = (await page.getByTestId("packed-sscc").textContent())!.trim();
    // GS1 General Specifications §2.2.1: an SSCC is 18 digits, AI (00).
    expect(sscc).toMatch(/^\d{18}$/);

    const { client, db } = openDb(inject("databaseUrl"));
    const [dealer] = await db.select().from(dealers).where(eq(dealers.code, "SNV"));
    client.close();
    const tracking = `NM-${Date.now().toString(36).toUpperCase()}`;
    await visit(page, url("/packing"));
    const form = page.getByTestId("ship-form");
    await form.locator(`input[name="cartons"][value="${carton}"]`).check();
    await form.getByLabel("Dealer").selectOption(dealer!.id);
    await form.getByLabel("Carrier").fill("Invented Carriers");
    await form.getByLabel("Tracking number").fill(tracking);
    await form.getByRole("button", { name: /^Ship 1 carton$/ }).click();
    await page.getByTestId("shipped").waitFor();

    const message = await waitForMail(dealer!.email, new RegExp(`tracking ${tracking}$`));
    const raw = await simpleParser(readFileSync(join(inject("mailboxDir"), message.id)));
    const note = raw.attachments.find((a) => a.filename?.startsWith("delivery-note-"));
    expect(note?.contentType).toBe("application/pdf");
    const { text } = await extractText(await getDocumentProxy(new Uint8Array(note!.content)), { mergePages: true });
    expect(text).toContain(dealer!.name);
    expect(text).toContain(`${dealer!.postcode} ${dealer!.city}`);
    expect(text).toContain(sscc);
    expect(text).toContain(w.pair);
    expect(text).toContain(tracking);
    expect(raw.attachments.some((a) => a.filename === `certificate-${w.pair}.pdf`)).toBe(true);
    await page.context().close();
  });
});
