/**
 * Metal trim parts in the browser: the cabinet shop receives a supplier's delivery and sees the
 * serials, opens a part's route by scanning its label and records its last step, and assembly
 * fits the parts at the tower's trim positions, refusing one whose route is unfinished. The other
 * route steps and the drive units are prepared through the stations' own code in the test process
 * (steps dated in the past, holds respected). All serials, lots and names are invented.
 */
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { finishes, items, models, users, type Item } from "@/db/schema";
import { setClock } from "@/lib/clock";
import { acceptCrossoverPlan, buildCrossover } from "@/lib/lab/crossovers";
import { acceptPlan, importResponseFiles, registerBatch } from "@/lib/lab/units";
import { recordStep, routeOf } from "@/lib/route/pair-route";
import { receiveTrimParts } from "@/lib/trim/receive";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { axeViolations, demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";
import { goodReadings } from "../fixtures/route";

let browser: Browser;
let page: Page;
const DAY = 86_400_000;
const HOUR = 3_600_000;
const w = { pair: "", T: [] as string[], M: [] as string[], B: [] as string[], xo: [] as string[], unfinished: "" };
let cabinetId = "";
let tb3Id = "";

const flat = (serial: string) => [`* ${serial}`, "Freq(Hz) SPL(dB)", ...Array.from({ length: 121 }, (_, k) => `${(20 * 2 ** (k / 12)).toFixed(2)}\t90`)].join("\n");

/** The good readings of a trim step (inside the demo workshop's windows). */
function trimReadings(key: string): Record<string, string | boolean> {
  if (key.startsWith("trim-paint-")) return { coat: key.slice("trim-paint-".length) };
  if (key === "trim-film") return { filmUm: "85" };
  if (key.includes("check") || key === "trim-inspection") return { pass: true };
  return {};
}

beforeAll(async () => {
  const { client, db } = openDb(inject("databaseUrl"));
  const id = async (role: string) => (await db.select().from(users).where(eq(users.email, demoEmail(role))))[0]!.id;
  const [veneer, cabinet, lab] = [await id("veneer"), await id("cabinet"), await id("lab")];
  cabinetId = cabinet;
  const tb3 = (await db.select().from(models)).find((m) => m.code === "TB3")!;
  tb3Id = tb3.id;
  const fs = await db.select().from(finishes);
  const today = new Date().toISOString().slice(0, 10);

  // A veneered tower pair (four leaves a face) walked along its cabinet route in the past.
  const flitch = await receiveFlitch(db, { finishId: fs.find((f) => f.kind === "veneer")!.id, logReference: "LOG-TRIM", supplier: "Trim test", receivedOn: today, leafThicknessMm: 0.6, leafCount: 8 }, { id: veneer });
  for (const l of (await flitchView(db, flitch.identity))!.leaves) await measureLeaf(db, l.id, { lengthMm: 1200, widthMm: 300, usable: true }, { id: veneer });
  const [made] = await confirmRuns(db, { flitchId: flitch.id, modelId: tb3.id, reservePerPair: 0, runs: [{ left: [1, 3, 5, 7], right: [2, 4, 6, 8], reserve: [] }] }, { id: veneer });
  w.pair = made!.pair.identity;
  let t = Date.now() - 40 * DAY;
  for (const s of (await routeOf(db, made!.pair)).spec.steps) {
    setClock(new Date(t));
    await recordStep(db, { pairId: made!.pair.id, seq: s.seq, sides: ["L", "R"], startedAt: new Date(t), readings: goodReadings(s.key) }, { id: cabinet });
    t += s.holdAfter && s.holdAfter.minutes > 240 ? 15 * DAY : 5 * HOUR;
  }
  setClock(null);

  // Matched sets for the tower: tweeter, midrange, two bass positions, and the boards.
  for (const [partType, count, key] of [["tweeter", 2, "T"], ["midrange", 2, "M"], ["bass", 4, "B"]] as const) {
    const b = await registerBatch(db, { partType, partNumber: `${partType}-TRIM`, maker: "Invented maker", lot: "L-TRIM", receivedOn: today, makerSerials: [], count }, { id: lab });
    await importResponseFiles(db, b.units.map((u) => ({ name: `${u.identity}.txt`, text: flat(u.identity) })), { batchId: b.id, source: "upload" }, { id: lab });
    const pairs = [{ a: b.units[0]!.identity, b: b.units[1]!.identity }, ...(count === 4 ? [{ a: b.units[2]!.identity, b: b.units[3]!.identity }] : [])];
    await acceptPlan(db, { batchId: b.id, modelId: tb3.id, pairs }, { id: lab });
    w[key] = b.units.map((u) => u.identity);
  }
  const parts = [{ position: "C1", lot: "LOT-E2E-TRIM-C47", partNumber: "PP-475", nominal: "4.7µF", tolerance: "J", reading: "4.72µF" }];
  for (let i = 0; i < 2; i++) w.xo.push((await buildCrossover(db, { modelId: tb3.id, parts, response: { name: `xo-t${i}.txt`, text: flat(`xo-t${i}`) } }, { id: lab })).crossover.identity);
  await acceptCrossoverPlan(db, { modelId: tb3.id, limitDb: 0.5, pairs: [{ a: w.xo[0]!, b: w.xo[1]! }] }, { id: lab });
  // A top housing received but not started on its route: refused at assembly.
  w.unfinished = (await receiveTrimParts(db, { modelId: tb3.id, position: "TOP", supplier: "Invented Metalworks", lotCode: "IMW-E2E-0", count: 1 }, { id: cabinet })).parts[0]!.identity;
  client.close();

  browser = await launchBrowser();
  page = await newPage(browser);
});
afterAll(async () => {
  setClock(null);
  await browser?.close();
});

/** Walks trim parts through every step but the last, dated in the past (the 24 h cure kept). */
async function walkAllButLast(identities: string[]) {
  const { client, db } = openDb(inject("databaseUrl"));
  for (const identity of identities) {
    const part = (await db.select().from(items).where(eq(items.identity, identity)))[0] as Item;
    const steps = (await routeOf(db, part)).spec.steps;
    let t = Date.now() - 5 * DAY;
    for (const s of steps.slice(0, -1)) {
      setClock(new Date(t));
      await recordStep(db, { pairId: part.id, seq: s.seq, sides: ["L"], startedAt: new Date(t), readings: trimReadings(s.key) }, { id: cabinetId });
      t += s.holdAfter ? s.holdAfter.minutes * 60_000 + HOUR : HOUR;
    }
  }
  setClock(null);
  client.close();
}

async function finishLast(identities: string[]) {
  const { client, db } = openDb(inject("databaseUrl"));
  for (const identity of identities) {
    const part = (await db.select().from(items).where(eq(items.identity, identity)))[0] as Item;
    const last = (await routeOf(db, part)).spec.steps.at(-1)!;
    await recordStep(db, { pairId: part.id, seq: last.seq, sides: ["L"], readings: trimReadings(last.key) }, { id: cabinetId });
  }
  client.close();
}

/** Scans into an assembly field as a scanner does (the label, then Enter) and waits for the server's answer. */
async function scanInto(key: string, code: string): Promise<string> {
  const result = page.getByTestId(`result-${key}`);
  const before = (await result.textContent()) ?? "";
  await page.getByTestId(`scan-${key}`).fill(code);
  await page.getByTestId(`scan-${key}`).press("Enter");
  await expect.poll(async () => {
    const text = (await result.textContent()) ?? "";
    return text !== before && text.trim() !== "" && !text.includes("Checking");
  }).toBe(true);
  return (await result.textContent()) ?? "";
}

/** Receives a delivery through the goods-in form and returns the serials the page names. */
async function receiveThroughForm(position: string, lot: string): Promise<string[]> {
  await visit(page, url("/cabinet/trim"));
  await page.getByLabel("Model").selectOption({ value: tb3Id });
  await page.getByLabel("Trim position").selectOption({ value: position });
  await page.getByLabel("Supplier", { exact: true }).fill("Invented Metalworks");
  await page.getByLabel("Supplier's lot code").fill(lot);
  await page.getByLabel("Parts received").fill("2");
  await page.getByRole("button", { name: "Receive the parts" }).click();
  await page.getByTestId("trim-received").waitFor();
  return ((await page.getByTestId("trim-received").textContent()) ?? "").split(",").map((s) => s.trim());
}

describe("trim parts", () => {
  const received = { TOP: [] as string[], PLN: [] as string[] };

  test("the cabinet shop receives a delivery; a blank lot code is refused beside its field", async () => {
    await signIn(page, demoEmail("cabinet"));
    await visit(page, url("/cabinet/trim"));
    expect(await axeViolations(page)).toEqual([]);
    await page.getByLabel("Model").selectOption({ value: tb3Id });
    await page.getByLabel("Trim position").selectOption({ value: "TOP" });
    await page.getByLabel("Supplier", { exact: true }).fill("Invented Metalworks");
    await page.getByRole("button", { name: "Receive the parts" }).click();
    await page.getByTestId("trim-receive-refused").waitFor();
    expect(await page.getByTestId("trim-receive-form").textContent()).toContain("Give the supplier's lot code");

    received.TOP = await receiveThroughForm("TOP", "imw-e2e-1");
    received.PLN = await receiveThroughForm("PLN", "IMW-E2E-2");
    expect([...received.TOP, ...received.PLN].every((s) => /^T-TB3-\d{2}-\d{5}-[0-9A-Z*]$/.test(s))).toBe(true);
    expect(await page.getByTestId("trim-parts").textContent()).toContain("IMW-E2E-1");
  });

  test("a part's route opens from a scan of its label, and its last step is recorded on the page", async () => {
    await walkAllButLast([...received.TOP, ...received.PLN]);
    await visit(page, url("/cabinet"));
    await page.getByLabel("Scan a cabinet, pair or trim-part label").fill(received.TOP[0]!);
    await page.getByRole("button", { name: "Open" }).click();
    await page.getByTestId("route-page").waitFor();
    expect(await page.getByTestId("route-pair").textContent()).toBe(received.TOP[0]);
    expect(await page.getByTestId("route-cabinets").textContent()).toContain("This trim part");
    expect(await axeViolations(page)).toEqual([]);
    await page.getByLabel("Inspector's check: finish even, no runs or burn-through").selectOption("pass");
    await page.getByRole("button", { name: "Record final inspection" }).click();
    await page.getByTestId("step-done").waitFor();
    expect(await page.getByTestId("step-done").textContent()).toBe("Recorded step 8, Final inspection.");
    expect(await page.getByTestId("route-page").textContent()).toContain("The trim part has finished its route");
    await finishLast([received.TOP[1]!, ...received.PLN]);
  });

  test("assembly refuses an unfinished trim part beside its field and builds the tower with its trim", async () => {
    // A fitter at the assembly station: a browser of their own.
    await page.close();
    page = await newPage(browser);
    await signIn(page, demoEmail("assembly"));
    await visit(page, url(`/assembly/${encodeURIComponent(w.pair)}`));
    await page.getByTestId("build-form").waitFor();
    for (const [i, side] of (["L", "R"] as const).entries()) {
      expect(await scanInto(`${side}.T`, w.T[i]!)).toContain("✓");
      expect(await scanInto(`${side}.M`, w.M[i]!)).toContain("✓");
      expect(await scanInto(`${side}.B1`, w.B[i]!)).toContain("✓");
      expect(await scanInto(`${side}.B2`, w.B[i + 2]!)).toContain("✓");
      expect(await scanInto(`${side}.XO`, w.xo[i]!)).toContain("✓");
    }
    expect(await scanInto("L.TOP", w.unfinished)).toContain(`${w.unfinished} has not finished its route: its next step is 1, Sanding, machine and hand.`);
    expect(await scanInto("L.TOP", received.PLN[0]!)).toContain("this field is for the top housing (TOP)");
    expect(await scanInto("L.TOP", received.TOP[0]!)).toContain("✓");
    expect(await scanInto("R.TOP", received.TOP[1]!)).toContain("✓");
    expect(await scanInto("L.PLN", received.PLN[0]!)).toContain("✓");
    expect(await scanInto("R.PLN", received.PLN[1]!)).toContain("✓");
    await page.getByLabel("Both speakers cleaned: no dust, flux or fingerprints").check();
    await page.getByLabel(/Final inspection done/).check();
    await page.getByTestId("build-submit").click();
    await page.getByTestId("built-speakers").waitFor();
    await expect.poll(() => page.getByTestId("built-speakers").textContent()).toMatch(/Left speaker:\s*S-TB3-.*Right speaker:\s*S-TB3-/);
  });
});
