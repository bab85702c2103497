/**
 * Recalls in Chromium (issue 14). (a) Quality raises a containment on every press cycle of the
 * forming press in a window that holds both a pair still on the cabinet route and shipped pairs;
 * the held pair's station page names the containment and offers no record form; the dealers'
 * notices reach the stand-in SMTP server; every serial is inspected and cleared; the containment
 * closes with its approver. (b) An owner registers their pair from the verify page, confirms by
 * e-mail, and then receives the recall notice of a containment on that pair.
 */
import { rmSync, writeFileSync } from "node:fs";
import { and, eq, sql } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { certificates, items, users } from "@/db/schema";
import { containmentOrRefuse, dealersOf } from "@/lib/containments";
import { readingsAtStation } from "@/lib/route/readings";
import { paths } from "@/lib/paths";
import { AFFECTED_GROUPS } from "@/lib/vocabulary/containments";
import { workshopDay } from "@/lib/workshop-time";
import { demoEmail, launchBrowser, linkIn, newPage, signIn, url, visit, waitForMail } from "./browser-helpers";

const { client, db } = openDb(inject("databaseUrl"));
let browser: Browser;
let quality: Page;
let cabinet: Page;
let qualityName = "";
/** The press window: from the day the newest shipped pair was pressed, to today. */
const window = { from: "", to: "" };
/** Pairs still on the cabinet route that were pressed inside the window, newest first. */
let inRoute: string[] = [];

beforeAll(async () => {
  const today = workshopDay(new Date());
  const pressed = await readingsAtStation(db, { station: "press", from: "2000-01-01", to: today });
  const shipped = pressed.filter((r) => r.pair.state === "shipped").sort((a, b) => b.recordedAt.getTime() - a.recordedAt.getTime())[0];
  if (!shipped) throw new Error("the demo has no shipped pair with a press cycle");
  window.from = workshopDay(shipped.recordedAt);
  window.to = today;
  inRoute = [...new Set(pressed.filter((r) => r.recordedAt >= shipped.recordedAt && r.pair.state === "in_production" && r.cabinets.some((c) => c.state === "in_route")).sort((a, b) => b.recordedAt.getTime() - a.recordedAt.getTime()).map((r) => r.pair.identity))];
  if (!inRoute.length) throw new Error("the demo has no pair on the cabinet route pressed after its newest shipped pair");
  const [q] = await db.select({ name: users.name }).from(users).where(eq(users.email, demoEmail("quality")));
  qualityName = q!.name;
  browser = await launchBrowser();
  quality = await newPage(browser);
  await signIn(quality, demoEmail("quality"));
  cabinet = await newPage(browser);
  await signIn(cabinet, demoEmail("cabinet"));
});
afterAll(async () => {
  rmSync(inject("clockFile"), { force: true });
  await browser?.close();
  client.close();
});

const containmentCount = async () => Number((await db.all<{ n: number }>(sql`SELECT count(*) AS n FROM containments`))[0]!.n);

/** Waits for an action's answer in a form's answer box and returns its words. */
async function answerOf(page: Page, testId: string, before: string | null = null): Promise<string> {
  await expect.poll(async () => ((await page.getByTestId(testId).count()) ? await page.getByTestId(testId).textContent() : null), { timeout: 20_000 }).not.toBe(before);
  return (await page.getByTestId(testId).textContent()) ?? "";
}

/** Raises a containment through the form and returns its code, read from the page it opens. */
async function raise(page: Page, fill: () => Promise<void>): Promise<string> {
  await fill();
  await page.getByRole("button", { name: "Raise the containment" }).click();
  await page.waitForURL(/\/quality\/containments\/CN\d{4}-\d{4}$/, { timeout: 20_000 });
  await page.getByTestId("containment-page").waitFor();
  return decodeURIComponent(new URL(page.url()).pathname.split("/").pop()!);
}

describe("a recall worked through from the quality pages", () => {
  test("raise on a press window → the held pair is refused at its station → dealers told → inspected and cleared → closed", { timeout: 240_000 }, async () => {
    // The demo's pairs on the route wait out their lacquer's two weeks of curing: the app's clock
    // moves past that (lib/clock.ts), so a pair whose next step may be recorded can be found.
    writeFileSync(inject("clockFile"), `+${16 * 24 * 3600 * 1000}`);
    // A pair on the route whose next step the cabinet shop may record now.
    let held = "";
    for (const pair of inRoute) {
      await visit(cabinet, url(paths.cabinetPair(pair)));
      if (await cabinet.getByTestId("step-form").count()) {
        held = pair;
        break;
      }
    }
    expect(held, `one of ${inRoute.join(", ")} offers its step form`).not.toBe("");

    await visit(quality, url(paths.quality));
    await quality.getByTestId("raise-containment-link").click();
    await quality.getByTestId("raise-form").waitFor();
    await quality.getByLabel("Everything through a station between two dates").check();
    await quality.getByLabel("Station", { exact: true }).selectOption("press");
    await quality.getByLabel("From (first day)").fill(window.from);
    await quality.getByLabel("To (last day)").fill(window.to);

    // Without a reason or a severity: refused beside the fields, nothing written.
    const before = await containmentCount();
    await quality.getByRole("button", { name: "Raise the containment" }).click();
    await expect(answerOf(quality, "raise-refused")).resolves.toContain("Nothing was written");
    await expect(quality.getByText("Say why it is suspect").count()).resolves.toBeGreaterThan(0);
    expect(await containmentCount()).toBe(before);

    await quality.getByLabel("Why it is suspect").fill("The forming press's platen thermostat read 12 °C low over these weeks: glue lines may be under-cured.");
    await quality.getByLabel(/^Major/).check();
    await quality.getByRole("button", { name: "Preview what it reaches" }).click();
    const preview = await answerOf(quality, "raise-preview");
    expect(preview).toMatch(/In build: [1-9]/);
    expect(preview).toMatch(/Shipped: [1-9]/);
    expect(await containmentCount()).toBe(before);
    const code = await raise(quality, async () => {});
    expect(await containmentCount()).toBe(before + 1);
    await expect(quality.getByTestId("group-in_build").textContent()).resolves.toContain(held);

    // The held pair at its station: the containment is named and no step can be recorded.
    // (Station pages refusing held pairs are built in parallel; this is what the issue asks of them.)
    await visit(cabinet, url(paths.cabinetPair(held)));
    await cabinet.getByTestId("route-page").waitFor();
    expect.soft(await cabinet.getByTestId("route-page").textContent(), "the station page names the containment").toContain(code);
    expect.soft(await cabinet.getByTestId("step-form").count(), "the station page offers no record form").toBe(0);

    // Notices: one to each dealer of the shipped serials, through the outbox to the SMTP stand-in.
    const c = await containmentOrRefuse(db, code);
    const dealers = await dealersOf(db, c.id);
    expect(dealers.length).toBeGreaterThan(0);
    await quality.getByLabel("Words for owners (optional)").fill("Please stop using the speakers and contact your dealer; we will collect and inspect them at no cost.");
    await quality.getByRole("button", { name: "Send notices" }).click();
    await expect(answerOf(quality, "notices-form-answer")).resolves.toMatch(/Notices are on their way to \d+ dealer/);
    const [dealer] = await db.all<{ email: string }>(sql`SELECT email FROM dealers WHERE code = ${dealers[0]!.code}`);
    const mail = await waitForMail(dealer!.email, new RegExp(`Containment ${code}`));
    expect(mail.text).toContain(code);
    await expect.poll(async () => {
      await visit(quality, url(paths.containment(code)));
      return quality.getByTestId("notices-table").textContent();
    }).toContain("Delivered to the mail server");
    await expect(quality.getByTestId("notices-table").textContent()).resolves.toContain(dealer!.email);

    // Every serial inspected (passed), then cleared, a group at a time; the server picks the whole group.
    for (const group of AFFECTED_GROUPS) {
      if (!(await quality.getByTestId(`move-${group}`).count())) continue;
      for (const [to, words] of [
        ["passed", "Inspected: passed"],
        ["cleared", "Cleared"],
      ] as const) {
        const form = quality.getByTestId(`move-${group}`);
        await form.getByTestId(`whole-${group}`).check();
        await form.getByLabel("What was done").selectOption(to);
        if (to === "passed") await form.getByLabel("Note").fill("Glue lines sound under load and on tap test.");
        const was = (await quality.getByTestId(`move-answer-${group}`).count()) ? await quality.getByTestId(`move-answer-${group}`).textContent() : null;
        await form.getByRole("button", { name: /^Record for/ }).click();
        await expect(answerOf(quality, `move-answer-${group}`, was)).resolves.toContain(`now “${words}`);
      }
    }

    await visit(quality, url(paths.containment(code)));
    const progress = await quality.getByTestId("containment-progress").textContent();
    expect(progress).toMatch(/(\d+) of \1 affected serials? dealt with/);
    await quality.getByLabel("Why it can close").fill("Every pair inspected on return or at its station: no under-cured glue line found. Thermostat replaced.");
    await quality.getByRole("button", { name: `Close ${code}` }).click();
    // Closed, the page drops its forms and says so in its heading.
    await expect.poll(() => quality.getByTestId("containment-status").textContent(), { timeout: 20_000 }).toBe("Closed");
    await visit(quality, url(paths.containment(code)));
    await expect(quality.getByTestId("containment-status").textContent()).resolves.toBe("Closed");
    await expect(quality.getByTestId("containment-closed").textContent()).resolves.toContain(`approved by ${qualityName}`);
    await expect(quality.getByTestId("close-form").count()).resolves.toBe(0);
  });
});

describe("an owner who registered is told of a recall", () => {
  test("registers from the verify page, confirms by e-mail, and receives the containment's notice", { timeout: 180_000 }, async () => {
    // The newest shipped pair with a certificate (the owner-registration walk takes the first one).
    const [row] = await db
      .select({ code: certificates.code, identity: items.identity })
      .from(certificates)
      .innerJoin(items, eq(items.id, certificates.pairId))
      .where(and(eq(items.kind, "pair"), eq(items.state, "shipped")))
      .orderBy(sql`${items.identity} DESC`)
      .limit(1);
    if (!row) throw new Error("the demo has no shipped pair with a certificate");
    const email = `e2e-recall-owner-${Date.now()}@example.test`;
    const owner = await newPage(browser);
    await visit(owner, url(`/verify/${row.code}`));
    await owner.getByTestId("verify-register").waitFor();
    await owner.getByLabel("Your name").fill("Ines Marlow");
    await owner.getByLabel("E-mail").fill(email);
    await owner.getByLabel("Town").fill("Fenwick Cross");
    await owner.getByLabel("Country").fill("gb");
    await owner.getByTestId("registration-consent").check();
    await owner.getByRole("button", { name: "Register my pair" }).click();
    await owner.getByTestId("registration-sent").waitFor();
    await visit(owner, linkIn(await waitForMail(email, /Confirm the registration/), "/verify/registration/"));
    await owner.getByTestId("registration-confirm").click();
    await owner.getByTestId("registration-confirmed").waitFor();

    await visit(quality, url(paths.containments));
    const code = await raise(quality, async () => {
      await quality.getByRole("textbox", { name: "Lot, batch, flitch or serial" }).fill(row.identity.toLowerCase());
      await quality.getByLabel("Why it is suspect").fill("Crossover boards of this pair may carry a resistor that overheats at high volume.");
      await quality.getByLabel(/^Critical/).check();
    });
    // A critical containment says to take care, deferring to the site's rules.
    await expect(quality.getByTestId("safety-cautions").textContent()).resolves.toContain("disconnected from any amplifier");
    await expect(quality.getByTestId("group-shipped").textContent()).resolves.toContain(row.identity);
    await quality.getByLabel("Words for owners (optional)").fill("Please switch the amplifier off, disconnect the speakers and do not use them until we have checked them.");
    await quality.getByRole("button", { name: "Send notices" }).click();
    await expect(answerOf(quality, "notices-form-answer")).resolves.toMatch(/\d+ owners?\./);
    const notice = await waitForMail(email, /Safety and quality notice/);
    expect(notice.subject).toContain(code);
    expect(notice.text).toContain("disconnect the speakers");
    expect(linkIn(notice, "/verify/consent/")).toBeTruthy();
  });
});
