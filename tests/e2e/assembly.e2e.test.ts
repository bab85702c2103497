/**
 * The assembly station in the browser: a fitter opens a pair by its label, scans its parts (a
 * wrong one refused in red beside its field), builds the speakers and sees their serials; and two
 * finished lacquer cabinets are paired. The world is prepared through the stations' own code in
 * the test process (a veneered pair walked along its route, matched sets, boards); only the
 * assembly is done through the pages. All serials and responses are invented.
 */
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { finishes, models, users } from "@/db/schema";
import { setClock } from "@/lib/clock";
import { changeState } from "@/lib/genealogy/graph";
import { acceptCrossoverPlan, buildCrossover } from "@/lib/lab/crossovers";
import { acceptPlan, importResponseFiles, registerBatch } from "@/lib/lab/units";
import { pairRoute, recordStep } from "@/lib/route/pair-route";
import { confirmRuns, flitchView, measureLeaf, receiveFlitch } from "@/lib/veneer/flitches";
import { makeLacquerCabinets } from "@/lib/cabinets/lacquer";
import { axeViolations, demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";
import { goodReadings } from "../fixtures/route";

let browser: Browser;
let page: Page;
const w = { pair: "", tweeter: [] as string[], bass: [] as string[], xo: [] as string[], xoLoose: "", lacquer: [] as string[] };


const flat = (serial: string) => [`* ${serial}`, "Freq(Hz) SPL(dB)", ...Array.from({ length: 121 }, (_, k) => `${(20 * 2 ** (k / 12)).toFixed(2)}\t90`)].join("\n");

beforeAll(async () => {
  const { client, db } = openDb(inject("databaseUrl"));
  const id = async (role: string) => (await db.select().from(users).where(eq(users.email, demoEmail(role))))[0]!.id;
  const [veneer, cabinet, lab] = [await id("veneer"), await id("cabinet"), await id("lab")];
  const pw2 = (await db.select().from(models)).find((m) => m.code === "PW2")!;
  const fs = await db.select().from(finishes);
  const today = new Date().toISOString().slice(0, 10);

  const flitch = await receiveFlitch(db, { finishId: fs.find((f) => f.kind === "veneer")!.id, logReference: "LOG-ASM", supplier: "Assembly test", receivedOn: today, leafThicknessMm: 0.6, leafCount: 4 }, { id: veneer });
  for (const l of (await flitchView(db, flitch.identity))!.leaves) await measureLeaf(db, l.id, { lengthMm: 900, widthMm: 300, usable: true }, { id: veneer });
  const [made] = await confirmRuns(db, { flitchId: flitch.id, modelId: pw2.id, reservePerPair: 0, runs: [{ left: [1, 3], right: [2, 4], reserve: [] }] }, { id: veneer });
  w.pair = made!.pair.identity;
  // The route, in this process's clock: five hours between steps, 15 days after the last coat.
  let t = Date.now() - 30 * 86_400_000;
  for (const s of (await pairRoute(db, made!.pair)).spec.steps) {
    setClock(new Date(t));
    await recordStep(db, { pairId: made!.pair.id, seq: s.seq, sides: ["L", "R"], startedAt: new Date(t), readings: goodReadings(s.key) }, { id: cabinet });
    t += s.holdAfter && s.holdAfter.minutes > 240 ? 15 * 86_400_000 : 5 * 3_600_000;
  }
  setClock(null);

  for (const partType of ["tweeter", "bass"] as const) {
    const b = await registerBatch(db, { partType, partNumber: `${partType}-E2E`, maker: "Invented maker", lot: "L-E2E", receivedOn: today, makerSerials: [], count: 4 }, { id: lab });
    await importResponseFiles(db, b.units.map((u) => ({ name: `${u.identity}.txt`, text: flat(u.identity) })), { batchId: b.id, source: "upload" }, { id: lab });
    await acceptPlan(db, { batchId: b.id, modelId: pw2.id, pairs: [{ a: b.units[0]!.identity, b: b.units[1]!.identity }, { a: b.units[2]!.identity, b: b.units[3]!.identity }] }, { id: lab });
    w[partType] = b.units.map((u) => u.identity);
  }
  const parts = [{ position: "C1", lot: "LOT-E2E-ASM-C47", partNumber: "PP-475", nominal: "4.7µF", tolerance: "J", reading: "4.72µF" }];
  // Boards are measured and paired in a set, as drive units are, before assembly fits them.
  for (let i = 0; i < 2; i++) w.xo.push((await buildCrossover(db, { modelId: pw2.id, parts, response: { name: `xo-${i}.txt`, text: flat(`xo-${i}`) } }, { id: lab })).crossover.identity);
  await acceptCrossoverPlan(db, { modelId: pw2.id, limitDb: 0.5, pairs: [{ a: w.xo[0]!, b: w.xo[1]! }] }, { id: lab });
  // Measured and passed, but in no set: refused at the station.
  w.xoLoose = (await buildCrossover(db, { modelId: pw2.id, parts, response: { name: "xo-loose.txt", text: flat("xo-loose") } }, { id: lab })).crossover.identity;
  const lacquer = await makeLacquerCabinets(db, { modelId: pw2.id, finishId: fs.find((f) => f.kind === "lacquer")!.id, count: 2 }, { id: cabinet });
  for (const c of lacquer) await changeState(db, c, "finished", { actorId: cabinet, station: "cabinet" });
  w.lacquer = lacquer.map((c) => c.identity);
  client.close();

  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("assembly"));
});
afterAll(async () => {
  setClock(null);
  await browser?.close();
});

/** WCAG 2.1 A and AA violations, as in accessibility.e2e.test.ts. */
/** Scans into a field as a scanner does (the label, then Enter) and waits for the server's answer. */
async function scanInto(key: string, code: string): Promise<string> {
  const result = page.getByTestId(`result-${key}`);
  const before = (await result.textContent()) ?? "";
  await page.getByTestId(`scan-${key}`).fill(code);
  await page.getByTestId(`scan-${key}`).press("Enter");
  // A new answer: not the one the field showed before, and not "Checking…".
  await expect.poll(async () => {
    const text = (await result.textContent()) ?? "";
    return text !== before && text.trim() !== "" && !text.includes("Checking");
  }).toBe(true);
  return (await result.textContent()) ?? "";
}

describe("the assembly station", () => {
  test("a pair opened by its label is built from scans; a wrong scan is refused beside its field", async () => {
    await visit(page, url("/assembly"));
    await expect.poll(() => page.getByTestId("assembly-waiting").textContent()).toContain(w.pair);
    expect(await axeViolations(page)).toEqual([]);
    await page.getByLabel("Scan a pair or cabinet label").fill(w.pair.toLowerCase());
    await page.getByRole("button", { name: "Open" }).click();
    await page.getByTestId("build-form").waitFor();

    expect(await scanInto("L.T", w.tweeter[0]!)).toContain(`✓ ${w.tweeter[0]}`);
    expect(await scanInto("R.T", w.tweeter[2]!)).toMatch(/The left tweeter is from set M-.*; the right one must be its partner/);
    expect(await axeViolations(page)).toEqual([]);
    expect(await scanInto("R.T", w.tweeter[1]!)).toContain(`✓ ${w.tweeter[1]}`);
    expect(await scanInto("L.B", w.xo[0]!)).toContain("is a crossover board; this field is for the bass (B): scan a bass unit.");
    expect(await scanInto("L.B", w.bass[0]!)).toContain("✓");
    expect(await scanInto("R.B", w.bass[1]!)).toContain("✓");
    expect(await scanInto("L.XO", w.xoLoose)).toContain("is not in a matched set of boards; the lab pairs boards left and right in sets before assembly");
    expect(await scanInto("L.XO", w.xo[0]!)).toContain("✓");
    expect(await scanInto("R.XO", w.xo[1]!)).toContain("✓");

    // Not yet inspected: refused, and the scans are kept.
    await page.getByTestId("build-submit").click();
    await expect.poll(() => page.getByTestId("build-error").textContent().catch(() => "")).toMatch(/Nothing was built/);
    expect(await page.getByTestId("scan-L.T").inputValue()).toBe(w.tweeter[0]);

    await page.getByLabel("Both speakers cleaned: no dust, flux or fingerprints").check();
    await page.getByLabel(/Final inspection done/).check();
    await page.getByLabel("Note (optional)").fill("e2e build");
    await page.getByTestId("build-submit").click();
    await page.getByTestId("built-speakers").waitFor();
    await expect.poll(() => page.getByTestId("built-speakers").textContent()).toMatch(/Left speaker:\s*S-PW2-.*Right speaker:\s*S-PW2-/);
    await page.getByTestId("print-speaker-labels").click();
    await page.getByTestId("print-labels").waitFor();
  });

  test("two finished lacquer cabinets are paired and open as a pair ready to build", async () => {
    await visit(page, url("/assembly"));
    await page.getByLabel("Left cabinet").fill(w.lacquer[0]!);
    await page.getByLabel("Right cabinet").fill(w.lacquer[0]!);
    await page.getByRole("button", { name: "Pair the two cabinets" }).click();
    await expect.poll(() => page.getByTestId("lacquer-pair-form").textContent()).toContain("scan two different cabinets");
    await page.getByLabel("Left cabinet").fill(w.lacquer[0]!);
    await page.getByLabel("Right cabinet").fill(w.lacquer[1]!);
    await page.getByRole("button", { name: "Pair the two cabinets" }).click();
    await page.getByTestId("assembly-pair-page").waitFor();
    expect(await page.getByTestId("assembly-pair").textContent()).toMatch(/^P-PW2-/);
    await page.getByTestId("build-form").waitFor();
  });
});
