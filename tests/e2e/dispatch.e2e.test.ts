import { readFileSync } from "node:fs";
import { join } from "node:path";
import { and, eq, isNull } from "drizzle-orm";
import { extractText, getDocumentProxy } from "unpdf";
import { simpleParser } from "mailparser";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, test } from "vitest";
import { openDb } from "@/db";
import { certificates, dealers, items, links } from "@/db/schema";
import { axeViolations, demoEmail, launchBrowser, newPage, pressPrint, signIn, url, waitForMail, visit } from "./browser-helpers";

let browser: Browser;
let page: Page;
const { client, db } = openDb(inject("databaseUrl"));

beforeAll(async () => {
  browser = await launchBrowser();
  page = await newPage(browser);
  await signIn(page, demoEmail("packing"));
});
afterAll(async () => {
  await browser?.close();
  client.close();
});

describe("dispatch, as a packer does it", () => {
  let pair = "";
  let carton = "";
  let sscc = "";
  const tracking = `E2E-${Date.now().toString(36).toUpperCase()}`;

  test("packs a tested pair from the packers' home by scan: a wrong serial refused beside its box, then both speakers, a storage place", async () => {
    await visit(page, url("/packing"));
    await page.getByTestId("area-packing").waitFor();
    await expect(page.getByTestId("safety-cautions").textContent()).resolves.toMatch(/two people or a lifting aid/);
    expect(await axeViolations(page), "/packing").toEqual([]);
    const row = page.getByTestId("ready-pair").first();
    pair = (await row.locator("td").first().textContent())!.trim();
    expect(pair).toMatch(/^P-/);
    await row.getByRole("link", { name: `Pack ${pair}` }).click();
    await page.getByTestId("pack-page").waitFor();
    expect(await axeViolations(page), "pack page").toEqual([]);

    // The certificate printed first, as the page asks: true of the pair as it stands, tested and not
    // yet packed. Its text is read back by unpdf (pdf.js), as docs/REFERENCES.md, § Reading back what Twinleaf prints suggests.
    const certificate = await pressPrint(page, "print-certificate");
    expect(certificate.status()).toBe(200);
    const { text } = await extractText(await getDocumentProxy(new Uint8Array(await certificate.body())), { mergePages: true });
    expect(text).toContain(pair);
    expect(text).toContain("Tested by:");
    expect(text).not.toMatch(/Packed by|not recorded|shipped/);

    // Scanning: the right speaker's label scanned into the left box (a scanner ends with Enter,
    // which moves on to the next box rather than sending the form), and nothing in the right box.
    const left = (await page.getByTestId("pair-left").textContent())!.trim();
    const right = (await page.getByTestId("pair-right").textContent())!.trim();
    await page.getByTestId("scan-left").fill(right);
    await page.getByTestId("scan-left").press("Enter");
    await expect(page.getByTestId("scan-right").evaluate((el) => el === document.activeElement)).resolves.toBe(true);
    await page.getByLabel("Storage location").fill("Rack E2E, shelf 1");
    const ticks = page.getByTestId("pack-item");
    for (let i = 0; i < (await ticks.count()); i++) await ticks.nth(i).check();
    // Every coded accessory scanned with its code (the hint under its box shows it).
    const coded = page.locator('input[data-scan-box][name="scan"]');
    for (let i = 0; i < (await coded.count()); i++) {
      const hint = await coded.nth(i).evaluate((el) => document.getElementById(el.getAttribute("aria-describedby")!.split(" ")[0]!)!.textContent!);
      await coded.nth(i).fill(hint.replace(/^Code /, ""));
    }
    await page.getByTestId("pack-submit").click();
    await page.getByTestId("pack-refused").waitFor();
    // Each refusal beside its own box, tied to it for screen readers; the scans are kept.
    const errorOf = (testId: string) => page.getByTestId(testId).evaluate((el) => el.getAttribute("aria-describedby")!.split(" ").map((id) => document.getElementById(id)?.textContent ?? "").join(" "));
    await expect(errorOf("scan-left")).resolves.toContain(`${right} is this pair's right speaker: scan it into the right speaker's box.`);
    await expect(errorOf("scan-right")).resolves.toContain("Scan the right speaker's serial.");
    expect(await axeViolations(page), "pack page with its error").toEqual([]);
    expect(await page.getByTestId("scan-left").inputValue()).toBe(right);

    await page.getByTestId("scan-left").fill(left);
    await page.getByTestId("scan-right").fill(right);
    await page.getByTestId("pack-submit").click();
    await page.getByTestId("packed").waitFor();
    carton = (await page.getByTestId("packed-carton").textContent())!.trim();
    expect(carton).toMatch(/^K-/);
    sscc = (await page.getByTestId("packed-sscc").textContent())!.trim();
    expect(sscc).toMatch(/^\d{18}$/);
    await expect(page.getByTestId("print-carton-label").evaluate((b) => (b as HTMLButtonElement).form?.target)).resolves.toBe("_blank");
  });

  test("prints the carton label: a PDF", async () => {
    const res = await pressPrint(page, "print-carton-label");
    expect(res.status()).toBe(200);
    expect(res.headers()["content-type"]).toBe("application/pdf");
    expect((await res.body()).subarray(0, 5).toString()).toBe("%PDF-");
  });

  test("ships it to a dealer; the dealer's e-mail arrives with the certificate attached", async () => {
    const [dealer] = await db.select().from(dealers).where(eq(dealers.code, "MLR"));
    await visit(page, url("/packing"));
    const form = page.getByTestId("ship-form");
    await form.locator(`input[name="cartons"][value="${carton}"]`).check();
    await form.getByLabel("Dealer").selectOption(dealer!.id);
    await form.getByLabel("Carrier").fill("Fernway Freight");
    await form.getByLabel("Tracking number").fill(tracking);
    await form.getByRole("button", { name: /^Ship 1 carton$/ }).click();
    await expect(page.getByTestId("shipped").textContent()).resolves.toMatch(/^Shipment H-MLR-/);
    await expect(page.getByTestId("shipped-today").textContent()).resolves.toContain(carton);

    // The form starts blank for the next shipment.
    expect(await form.getByLabel("Carrier").inputValue()).toBe("");
    expect(await form.getByLabel("Tracking number").inputValue()).toBe("");
    expect(await form.getByLabel("Dealer").inputValue()).toBe("");
    expect(await form.locator('input[name="cartons"]:checked').count()).toBe(0);

    // After a reload, "Shipped today (n)" counts the rows it lists, ours among them.
    await visit(page, url("/packing"));
    const heading = (await page.getByRole("heading", { name: /^Shipped today \(\d+\)$/ }).textContent())!;
    const rows = page.getByTestId("shipped-today").locator("tbody tr");
    expect(Number(/\((\d+)\)/.exec(heading)![1])).toBe(await rows.count());
    await expect(page.getByTestId("shipped-today").textContent()).resolves.toContain(carton);

    // The log names what each event is about by its serial, and says what happened in words.
    const log = page.getByTestId("event-table").first();
    for (const about of await log.locator("tbody tr td:nth-child(5)").allTextContents()) {
      expect(about).toMatch(/^(Pair|Speaker|Carton|Shipment|Cabinet) [A-Z]-[A-Z0-9]+-\d{2}-\d{5,}-[0-9A-Z*]$/);
    }
    await expect(log.textContent()).resolves.toMatch(new RegExp(`shipped the pair in carton ${carton} to ${dealer!.name} in shipment H-MLR-`));

    const message = await waitForMail(dealer!.email, new RegExp(`^Shipped: 1 matched pair, tracking ${tracking}$`));
    expect(message.text).toContain(pair);
    const raw = await simpleParser(readFileSync(join(inject("mailboxDir"), message.id)));
    const shipment = /shipment (H-MLR-[^)\s]+)\)/.exec(message.text)![1]!;
    expect(raw.attachments.map((a) => [a.filename, a.contentType])).toEqual([
      [`delivery-note-${shipment}.pdf`, "application/pdf"],
      [`certificate-${pair}.pdf`, "application/pdf"],
    ]);
    for (const a of raw.attachments) expect(a.content.subarray(0, 5).toString()).toBe("%PDF-");
    // The delivery note, read back with unpdf from the stand-in SMTP server's mailbox: the dealer's
    // address, the carton's SSCC, the pair and both speakers, the carrier and tracking.
    const { text: note } = await extractText(await getDocumentProxy(new Uint8Array(raw.attachments[0]!.content)), { mergePages: true });
    expect(note).toContain(dealer!.name);
    expect(note).toContain(`${dealer!.postcode} ${dealer!.city}`);
    for (const l of dealer!.address.split("\n")) expect(note).toContain(l.trim());
    expect(note).toContain(sscc);
    expect(note).toContain(pair);
    expect(note).toContain(tracking);
    expect(note).toContain("Total: 1 carton, 1 matched pair, 2 speakers");
    // The packer opens it again from the shipment's own address: a GET that only reads.
    const again = await page.request.get(url(`/api/v1/shipments/${shipment}/delivery-note`));
    expect(again.status()).toBe(200);
    expect(again.headers()["content-type"]).toBe("application/pdf");
  });

  test("a shipped pair's speakers read shipped in search", async () => {
    const [row] = await db.select({ id: items.id }).from(items).where(eq(items.identity, pair));
    const speakers = await db.select({ identity: items.identity }).from(links).innerJoin(items, eq(items.id, links.childId)).where(and(eq(links.parentId, row!.id), isNull(links.endedAt), eq(items.kind, "speaker")));
    expect(speakers).toHaveLength(2);
    for (const s of speakers) {
      const answer = await (await page.request.get(url(`/api/v1/search?q=${encodeURIComponent(s.identity)}`))).json();
      expect(answer.exact).toMatchObject({ identity: s.identity, state: "shipped" });
    }
  });

  test("at 800 px the pair's page says where it is in words, and no serial is cut", async () => {
    await page.setViewportSize({ width: 800, height: 900 });
    try {
      await visit(page, url(`/register/items/${encodeURIComponent(pair)}`));
      const place = (await page.getByTestId("current-place").first().textContent())!;
      expect(place).toMatch(new RegExp(`^In carton ${carton}, shipped to Merrow Lane[^,]* on \\d{1,2} \\w{3}( \\d{4})? in shipment H-MLR-`));
      await expect(page.getByTestId("shipped-when").textContent()).resolves.toMatch(/to Merrow Lane.* in shipment H-MLR-/);
      // Every serial in the cards at the top lies whole inside its card, on one line.
      const cut = await page.evaluate(() =>
        [...document.querySelectorAll('section:has([data-testid="current-place"]) .serial, section:has([data-testid="shipped-when"]) .serial')]
          .filter((el) => {
            const r = el.getBoundingClientRect();
            const card = el.closest("section")!.getBoundingClientRect();
            return r.right > card.right + 0.5 || r.height > parseFloat(getComputedStyle(el).lineHeight) * 1.5;
          })
          .map((el) => el.textContent),
      );
      expect(cut).toEqual([]);
      expect(await page.locator('section:has([data-testid="current-place"]) .serial').count()).toBeGreaterThanOrEqual(2);
    } finally {
      await page.setViewportSize({ width: 1024, height: 768 });
    }
  });

  test("Administration → Mail shows the certificate attached to the dealer's e-mail, and downloads it", async () => {
    const context = await browser.newContext({ viewport: { width: 1024, height: 768 } });
    try {
      const admin = await context.newPage();
      await signIn(admin, demoEmail("admin"));
      await visit(admin, url("/admin/mail"));
      await admin.getByRole("link", { name: `Shipped: 1 matched pair, tracking ${tracking}` }).click();
      const attachment = admin.getByTestId("mail-attachment").filter({ hasText: `certificate-${pair}.pdf` });
      await expect(attachment.textContent()).resolves.toMatch(new RegExp(`^certificate-${pair}\\.pdfPDF document · [\\d.]+ KBDownload$`));
      expect(await axeViolations(admin), "caught message").toEqual([]);
      const res = await admin.request.get(url((await attachment.getByRole("link", { name: `Download certificate-${pair}.pdf` }).getAttribute("href"))!));
      expect(res.status()).toBe(200);
      expect(res.headers()["content-type"]).toBe("application/pdf");
      expect(res.headers()["content-disposition"]).toMatch(new RegExp(`^attachment; filename="certificate-${pair}\\.pdf"`));
      expect(res.headers()["x-content-type-options"]).toBe("nosniff");
      expect((await res.body()).subarray(0, 5).toString()).toBe("%PDF-");
      // A packer may not read the caught mail.
      expect((await page.request.get(url((await attachment.getByRole("link").getAttribute("href"))!))).status()).toBe(403);
    } finally {
      await context.close();
    }
  });

  test("a signed-out phone opens the certificate's link and sees it is genuine; a wrong code is a 404", async () => {
    const [row] = await db
      .select({ code: certificates.code })
      .from(certificates)
      .innerJoin(items, eq(items.id, certificates.pairId))
      .where(eq(items.identity, pair));
    const context = await browser.newContext({ viewport: { width: 390, height: 844 } });
    try {
      const phone = await context.newPage();
      const res = await visit(phone, url(`/verify/${row!.code}`));
      expect(res?.status()).toBe(200);
      await expect(phone.getByTestId("verify-genuine").textContent()).resolves.toMatch(/This is a genuine Twinleaf certificate/);
      await expect(phone.getByTestId("verify-pair").textContent()).resolves.toBe(pair);
      expect(await axeViolations(phone), "verify page").toEqual([]);
      // Nothing internal: no dealer, no names of people.
      const body = (await phone.locator("main").textContent())!;
      expect(body).not.toMatch(/Merrow Lane|Fernway|@/);

      const missing = await visit(phone, url(`/verify/${"a".repeat(26)}`));
      expect(missing?.status()).toBe(404);
      await expect(phone.getByTestId("verify-unknown").textContent()).resolves.toMatch(/No certificate has this code\. Check the address on your certificate\./);
      expect(await axeViolations(phone), "verify 404").toEqual([]);
    } finally {
      await context.close();
    }
  });
});
