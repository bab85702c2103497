/**
 * The public certificate check after a repair, in Chromium, signed out: the original's code and
 * the current revision's code both verify; the original says a newer revision exists and when it
 * was issued; both show the owner's line about the repair and nothing internal (no case code, no
 * names, no ids). The repair is written straight into the e2e database the way the desk writes it
 * (tests/fixtures/service-repair.ts), then re-tested through lib/service/retest.
 */
import { eq } from "drizzle-orm";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { certificateRevisions, users } from "@/db/schema";
import { issueCertificate } from "@/lib/certificates";
import { setClock } from "@/lib/clock";
import { formatDay } from "@/lib/format";
import { retestCase } from "@/lib/service/retest";
import { repairedCase, shippedPair } from "../fixtures/service-repair";
import { launchBrowser, newPage, url, visit } from "./browser-helpers";

let browser: Browser;
let page: Page;
const { client, db } = openDb(inject("databaseUrl"));
const flat = (level: number) => ({ name: "r.txt", text: ["Freq SPL", ...Array.from({ length: 12 * 8 }, (_, k) => `${(100 * 2 ** (k / 12)).toFixed(3)} ${level}`)].join("\n") });

const secrets: string[] = [];
let originalCode = "";
let revision: typeof certificateRevisions.$inferSelect;

beforeAll(async () => {
  const [desk] = await db.select().from(users).where(eq(users.email, "service@demo.twinleaf.test"));
  setClock(new Date("2026-12-04T10:00:00Z"));
  const built = await shippedPair(db, desk!.id);
  const certificate = await issueCertificate(db, built.pair.id, desk!.id);
  // A code of the desk's own shape, from a month no demo case uses.
  const code = `RT2603-${String(1000 + (Date.now() % 9000))}`;
  const c = await repairedCase(db, { pair: built.pair, speakers: built.speakers, failed: built.tweeters.R, side: "R", code }, desk!.id);
  await retestCase(db, { code, left: flat(90), right: flat(90.3) }, { id: desk!.id });
  setClock(null);
  [revision] = (await db.select().from(certificateRevisions).where(eq(certificateRevisions.caseId, c.caseId))) as [typeof revision];
  originalCode = certificate.code;
  secrets.push(code, c.caseId, built.pair.id, certificate.id, revision.id, desk!.name, desk!.email);
  browser = await launchBrowser();
  page = await newPage(browser);
});
afterAll(async () => {
  await browser?.close();
  client.close();
});

describe("the public check of a repaired pair", () => {
  test("the original's code still verifies and says that revision 2 was issued, and when", async () => {
    const res = await visit(page, url(`/verify/${originalCode}`));
    expect(res?.status()).toBe(200);
    await page.getByTestId("verify-genuine").waitFor();
    const notice = (await page.getByTestId("verify-newer-revision").textContent())!;
    expect(notice).toContain("A newer revision of this certificate exists");
    expect(notice).toContain(`revision 2 was issued on ${formatDay(revision.issuedAt)}`);
    await expect(page.getByTestId("verify-repairs").textContent()).resolves.toContain("Right speaker's tweeter replaced on 4 December 2026 after a service visit.");
    const body = (await page.locator("body").textContent())!;
    for (const s of secrets) expect(body).not.toContain(s);
  });

  test("the current revision's code shows the revision and the repair line, with no notice of a newer one", async () => {
    const res = await visit(page, url(`/verify/${revision.code}`));
    expect(res?.status()).toBe(200);
    await page.getByTestId("verify-genuine").waitFor();
    expect(await page.getByTestId("verify-newer-revision").count()).toBe(0);
    await expect(page.getByTestId("verify-current-revision").textContent()).resolves.toContain("Revision 2");
    await expect(page.getByTestId("verify-repairs").textContent()).resolves.toContain("Right speaker's tweeter replaced on 4 December 2026 after a service visit.");
    const body = (await page.locator("body").textContent())!;
    for (const s of [...secrets, originalCode]) expect(body).not.toContain(s);
    // The page's headers are the proxy's, as before: no framing, no sniffing.
    expect(res!.headers()["x-frame-options"]).toBe("DENY");
    expect(res!.headers()["x-content-type-options"]).toBe("nosniff");
  });
});
