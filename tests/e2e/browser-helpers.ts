import { AxeBuilder } from "@axe-core/playwright";
import { chromium, type Browser, type Page } from "playwright-core";
import { inject } from "vitest";
import { readMailbox, type MailboxMessage } from "@/lib/mail/mailbox";

export const DEMO_PASSWORD = "twinleaf-demo";
export const demoEmail = (role: string) => `${role}@demo.twinleaf.test`;

// Debian's Chromium, never a downloaded one; the flags keep it quiet on a closed network.
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH || "/usr/bin/chromium",
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
}

export function url(path: string): string {
  return `${inject("baseUrl")}${path}`;
}

export async function newPage(browser: Browser): Promise<Page> {
  const context = await browser.newContext({ viewport: { width: 1024, height: 768 } });
  return context.newPage();
}

/** Signs in through the form and waits for the home page. */
export async function signIn(page: Page, email: string, password = DEMO_PASSWORD): Promise<void> {
  await page.goto(url("/sign-in"));
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.getByTestId("today").waitFor();
}

/** Waits for a message to an address whose subject matches, as caught by the stand-in SMTP server. */
export async function waitForMail(to: string, subject: RegExp, timeoutMs = 20_000): Promise<MailboxMessage> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    const found = (await readMailbox(inject("mailboxDir"), { limit: 200 })).find((m) => m.to.includes(to) && subject.test(m.subject));
    if (found) return found;
    await new Promise((r) => setTimeout(r, 250));
  }
  throw new Error(`no mail to ${to} matching ${subject} within ${timeoutMs} ms`);
}

/** The first link in a message's text that goes to the given path prefix. */
export function linkIn(message: MailboxMessage, pathPrefix: string): string {
  const link = message.text.match(/https?:\/\/\S+/g)?.find((l) => new URL(l).pathname.startsWith(pathPrefix));
  if (!link) throw new Error(`no ${pathPrefix} link in: ${message.text}`);
  return link;
}

/**
 * Opens a page and waits until it has settled. A page under a loading boundary streams: React
 * parks the finished part in a hidden copy and reveals it a moment later (it batches reveals), so
 * right after `load` a test id can stand twice in the document. This waits until no copy is left.
 */
export async function visit(page: Page, to: string) {
  const res = await page.goto(to);
  await page.waitForFunction(() => !document.querySelector('div[hidden][id^="S:"]'));
  return res;
}

/**
 * Presses a print button (a form POST that opens the PDF in a new tab) as the browser would
 * send it, with this page's cookies and Origin, following the server's 303 to the recorded print.
 */
export async function pressPrint(page: Page, testId: string, nth = 0) {
  const action = await page.getByTestId(testId).nth(nth).evaluate((b) => (b as HTMLButtonElement).form?.action ?? "");
  if (!action) throw new Error(`${testId} is not a button in a form`);
  return page.request.post(action, { headers: { origin: new URL(inject("baseUrl")).origin }, maxRedirects: 1 });
}

/**
 * The page's WCAG 2.1 A and AA failures as axe-core tags them, one line each. Next streams a
 * dynamic page's metadata after its shell, so the page is checked once it has its title.
 */
export async function axeViolations(page: Page): Promise<string[]> {
  await page.waitForFunction(() => document.title.length > 0);
  const result = await new AxeBuilder({ page }).withTags(["wcag2a", "wcag2aa", "wcag21a", "wcag21aa"]).analyze();
  return result.violations.map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(" ")).join(", ")})`);
}
