/**
 * The replacement page as the service desk uses it: the survivor, the ranked stock and the chart,
 * a hand-typed serial out of tolerance refused next to its field, a reservation, the repair with
 * its disposition, and the case moved to "repaired". The case is opened in the database here (the
 * intake is another page's work); the stock tweeters are invented, measured as the survivor's own
 * response shifted by 0.1 dB (fits the 0.5 dB limit) and 0.9 dB (does not).
 */
import { and, eq, sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { caseFindings, items, responses, serviceCases, users } from "@/db/schema";
import { newId } from "@/lib/auth/tokens";
import { appendEvent } from "@/lib/events/queries";
import { importResponseFiles, registerBatch } from "@/lib/lab/units";
import { paths } from "@/lib/paths";
import { partAt, speakerOf } from "@/lib/service/replacements";
import { moveCase } from "@/lib/service/states";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
let page: Page;
const world = { code: "", near: "", far: "", failed: "", survivor: "" };

beforeAll(async () => {
  const { client, db } = openDb(inject("databaseUrl"));
  const desk = (await db.select().from(users).where(eq(users.email, demoEmail("service"))))[0]!.id;
  const lab = (await db.select().from(users).where(eq(users.email, demoEmail("lab"))))[0]!.id;
  // A built pair with no open case, whose right tweeter was measured.
  const pairs = await db.all<{ id: string }>(sql`SELECT id FROM items WHERE kind = 'pair' AND id NOT IN (SELECT pair_id FROM service_cases WHERE state NOT IN ('closed', 'cancelled')) ORDER BY identity DESC`);
  let found: { pairId: string; speakerL: string; partnerR: string; failed: string; survivor: string; points: number[][] } | null = null;
  for (const { id } of pairs) {
    const L = await speakerOf(db, id, "L");
    const R = await speakerOf(db, id, "R");
    const tL = L && (await partAt(db, L.id, "T"));
    const tR = R && (await partAt(db, R.id, "T"));
    if (!L || !R || !tL || !tR) continue;
    const [resp] = await db.select().from(responses).where(and(eq(responses.itemId, tR.id), eq(responses.purpose, "unit"))).limit(1);
    if (!resp) continue;
    found = { pairId: id, speakerL: L.id, partnerR: R.id, failed: tL.identity, survivor: tR.identity, points: resp.points };
    break;
  }
  if (!found) throw new Error("the demo workshop has no built pair with a measured tweeter");
  const caseId = newId();
  // A code of the desk's own shape, from a month no demo case uses.
  const code = `RT2602-${String(1000 + (Date.now() % 9000))}`;
  const opened = await appendEvent(db, { actorId: desk, station: "service", type: "case.opened", subjectKind: "case", subjectId: caseId, data: { code } });
  await db.insert(serviceCases).values({ id: caseId, code, itemId: found.speakerL, pairId: found.pairId, partnerId: found.partnerR, returnedBy: "owner", receivedOn: new Date().toISOString().slice(0, 10), symptom: "no treble from the left speaker", openedAt: new Date(), eventId: opened });
  await moveCase(db, { caseId, to: "diagnosed" }, { id: desk });
  const f = await appendEvent(db, { actorId: desk, station: "service", type: "case.finding_recorded", subjectKind: "case", subjectId: caseId, data: { code, side: "L", position: "T", finding: "open voice coil" } });
  await db.insert(caseFindings).values({ caseId, side: "L", position: "T", finding: "open voice coil", eventId: f, createdAt: new Date() });

  const b = await registerBatch(db, { partType: "tweeter", partNumber: "T-SVC-E2E", maker: "An invented maker", lot: "L-SVC-E2E", receivedOn: new Date().toISOString().slice(0, 10), makerSerials: [], count: 2 }, { id: lab });
  const shifted = (serial: string, by: number) => [`* ${serial}`, "Freq(Hz)\tSPL(dB)", ...found!.points.map(([hz, level]) => `${hz}\t${(level! + by).toFixed(4)}`)].join("\n");
  await importResponseFiles(db, b.units.map((u, i) => ({ name: `${u.identity}.txt`, text: shifted(u.identity, i === 0 ? 0.1 : 0.9) })), { batchId: b.id, source: "upload" }, { id: lab });
  Object.assign(world, { code, near: b.units[0]!.identity, far: b.units[1]!.identity, failed: found.failed, survivor: found.survivor });
  client.close();

  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("service"));
});
afterAll(async () => {
  await browser?.close();
});

describe("a replacement for a failed tweeter, at the service desk", () => {
  test("shows the survivor, the ranked stock and the chart; refuses a typed serial out of tolerance next to its field", async () => {
    await visit(page, url(paths.serviceReplace(world.code, "L", "T")));
    await expect.poll(() => page.getByTestId("survivor").textContent()).toContain(world.survivor);
    const table = page.getByTestId("candidates");
    await expect.poll(() => table.textContent()).toContain(world.near);
    expect(await table.textContent()).not.toContain(world.far);
    await expect.poll(() => page.getByTestId("replace-chart").count()).toBe(1);
    await expect.poll(() => page.getByTestId("safety-cautions").textContent()).toMatch(/fume extraction/);

    const form = page.getByTestId("reserve-serial");
    await form.getByLabel("Serial of a stock part").fill(world.far.toLowerCase());
    await form.getByRole("button", { name: "Reserve this part" }).click();
    await expect.poll(() => form.getByText(/over the 0\.5 dB limit/).count()).toBeGreaterThan(0);
    const field = form.getByLabel("Serial of a stock part");
    expect(await field.getAttribute("aria-invalid")).toBe("true");
  });

  test("reserves the best one, fits it with a disposition, and the case becomes repaired", async () => {
    await visit(page, url(paths.serviceReplace(world.code, "L", "T")));
    await page.getByRole("button", { name: `Reserve ${world.near}` }).click();
    await expect.poll(() => page.getByTestId("reserved-here").textContent()).toContain(world.near);

    const fitForm = page.getByTestId("fit-form");
    await fitForm.getByRole("button", { name: "Record the repair" }).click();
    await expect.poll(() => fitForm.getByText(/Choose what becomes of the part taken out/).count()).toBeGreaterThan(0);
    await fitForm.getByLabel("What becomes of the part taken out").selectOption("returned_to_maker");
    await fitForm.getByLabel("Why it comes out").fill("open voice coil");
    await fitForm.getByRole("button", { name: "Record the repair" }).click();
    await expect.poll(() => page.getByTestId("repairs").textContent()).toContain(world.failed);
    expect(await page.getByTestId("repairs").textContent()).toMatch(/returned to its maker/);

    await page.getByTestId("mark-repaired").getByRole("button", { name: "Mark the case repaired" }).click();
    const { client, db } = openDb(inject("databaseUrl"));
    try {
      await expect.poll(async () => (await db.select({ s: serviceCases.state }).from(serviceCases).where(eq(serviceCases.code, world.code)))[0]?.s).toBe("repaired");
      expect((await db.select({ s: items.state }).from(items).where(eq(items.identity, world.failed)))[0]?.s).toBe("returned_to_maker");
      expect((await db.select({ s: items.state }).from(items).where(eq(items.identity, world.near)))[0]?.s).toBe("fitted");
    } finally {
      client.close();
    }
  });

  test("the JSON route answers the same ranking to a signed-in reader", async () => {
    const res = await page.request.get(url(`/api/v1/service/cases/${world.code}/replacements?side=L&position=T`));
    expect(res.status()).toBe(200);
    const body = (await res.json()) as { survivor: { serial: string }; limitDb: number; candidates: { serial: string }[] };
    expect(body.survivor.serial).toBe(world.survivor);
    expect(body.limitDb).toBe(0.5);
    expect(body.candidates.map((c) => c.serial)).not.toContain(world.far);
  });
});
