/**
 * The shell on a phone, a tablet held upright and a desk screen: every role opens its pages at
 * 390, 800 and 1280 px. On each page nothing scrolls sideways, no serial is cut off or broken over
 * two lines, and below a tablet's landscape width (1024 px) the areas wait behind their button,
 * which opens and closes them like a disclosure should. A screenshot of each page is saved under
 * .tmp/screenshots/ for a person to look at.
 */
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { AREAS } from "@/lib/areas";
import { ROLE_PERMISSIONS } from "@/lib/auth/permissions";
import { ROLES, type Role } from "@/lib/auth/roles";
import { paths } from "@/lib/paths";
import { demoEmail, launchBrowser, signIn, url, visit } from "./browser-helpers";

/**
 * A phone, folded navigation; and the narrowest window that shows the sidebar (Tailwind's lg), where
 * a page has the least room beside it. Wider windows only have more room.
 */
const WIDTHS = [390, 1024] as const;
/** `E2E_SCREENSHOTS=1` saves every page at every width under .tmp/screenshots. */
const SCREENSHOTS = process.env.E2E_SCREENSHOTS === "1";
/** Below this the areas fold behind their button (Tailwind's lg, components/shell/area-navigation.tsx). */
const SIDEBAR_FROM = 1024;
const SHOTS = join(process.cwd(), ".tmp/screenshots");

/** Pages at a fixed address, from lib/paths. */
const FIXED: string[] = Object.values(paths as Record<string, unknown>).filter((p): p is string => typeof p === "string");
/** The register's record pages are the same for every role: one role opens them. */
const REGISTER_RECORDS_BY: Role = "quality";
const REGISTER_RECORDS = [paths.item(""), paths.dealer("")];
/** A record page each area lists, found by where its links go. */
const RECORDS: string[] = [
  paths.flitch(""),
  paths.cabinetPair(""),
  paths.labBatch(""),
  paths.assemblyPair(""),
  paths.pack(""),
  paths.item(""),
  paths.dealer(""),
  paths.serviceCase(""),
  `${paths.adminUsers}/`,
  `${paths.adminMail}/`,
  `${paths.adminRoutes}/`,
];

const areasOf = (role: Role) => AREAS.filter((a) => ROLE_PERMISSIONS[role].includes(a.permission));
const areaOf = (path: string) => AREAS.find((a) => path === a.href || path.startsWith(`${a.href}/`));

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
  mkdirSync(SHOTS, { recursive: true });
});
afterAll(async () => {
  await browser?.close();
});

/** Today, the fixed pages of the role's areas, and the first record of each kind they link to. */
async function pagesOf(page: Page, role: Role): Promise<string[]> {
  const mine = areasOf(role);
  // The register's pages read the same for every role: one role opens them (the rest still see its link).
  const fixed = ["/", ...FIXED.filter((p) => p !== "/" && (p !== paths.register || role === REGISTER_RECORDS_BY) && mine.some((a) => p === a.href || p.startsWith(`${a.href}/`)))];
  const records = new Map<string, string>();
  for (const p of fixed) {
    await visit(page, url(p));
    const hrefs = await page.locator("main a[href^='/']").evaluateAll((as) => as.map((a) => a.getAttribute("href")!));
    for (const prefix of RECORDS) {
      if (records.has(prefix) || !mine.some((a) => prefix.startsWith(`${a.href}/`))) continue;
      if (REGISTER_RECORDS.includes(prefix) && role !== REGISTER_RECORDS_BY) continue;
      const found = hrefs.find((h) => h.startsWith(prefix) && !FIXED.includes(h.split("?")[0]!) && h.length > prefix.length);
      if (found) records.set(prefix, found);
    }
  }
  return [...fixed, ...records.values()];
}

/** What a person would find wrong on the page at this width, as sentences. */
async function problemsOn(page: Page): Promise<string[]> {
  return page.evaluate(() => {
    const out: string[] = [];
    const doc = document.documentElement;
    if (doc.scrollWidth > doc.clientWidth) out.push(`the page scrolls sideways: ${doc.scrollWidth} px wide in ${doc.clientWidth} px`);
    for (const el of Array.from(document.querySelectorAll<HTMLElement>(".serial"))) {
      if (el.getClientRects().length === 0 || el.closest(".sr-only")) continue; // not shown
      const text = (el.textContent ?? "").trim();
      if (el.clientWidth > 0 && el.scrollWidth > el.clientWidth) out.push(`serial “${text}” is cut off (${el.scrollWidth} px in ${el.clientWidth} px)`);
      const range = document.createRange();
      range.selectNodeContents(el);
      const rects = Array.from(range.getClientRects()).filter((r) => r.width > 0);
      if (rects.length === 0) continue;
      const height = Math.max(...rects.map((r) => r.bottom)) - Math.min(...rects.map((r) => r.top));
      // One line of text is about 1.2 font sizes tall; two lines are well over 1.8.
      if (height > 1.8 * parseFloat(getComputedStyle(el).fontSize)) out.push(`serial “${text}” breaks over two lines`);
    }
    return out;
  });
}

/** The header's parts lie inside the screen, side by side or stacked. */
async function headerProblems(page: Page, width: number): Promise<string[]> {
  const out: string[] = [];
  for (const [name, locator] of [
    ["the search box", page.getByTestId("search-input")],
    ["the user's name", page.getByTestId("user-name")],
    ["sign out", page.getByRole("button", { name: "Sign out" })],
  ] as const) {
    const box = await locator.boundingBox();
    if (!box) out.push(`${name} is not shown`);
    else if (box.x < 0 || box.x + box.width > width + 0.5) out.push(`${name} reaches past the screen (${Math.round(box.x)}–${Math.round(box.x + box.width)} px)`);
  }
  return out;
}

/** Below the tablet width: hidden behind its button, opened by it, closed by Escape with focus back. */
async function checkNavigation(page: Page, width: number, path: string) {
  const nav = page.getByTestId("area-nav");
  const button = page.getByTestId("area-menu-button");
  const here = areaOf(path)?.label ?? "Today";
  if (width >= SIDEBAR_FROM) {
    expect(await nav.isVisible(), `${path}: the sidebar shows`).toBe(true);
    expect(await button.isVisible(), `${path}: no menu button beside the sidebar`).toBe(false);
    expect(await nav.locator("[aria-current='page']").innerText()).toBe(here);
    return;
  }
  expect(await nav.isVisible(), `${path}: the areas wait behind their button`).toBe(false);
  expect(await button.getAttribute("aria-expanded")).toBe("false");
  expect(await button.getAttribute("aria-controls")).toBe(await nav.getAttribute("id"));
  await button.click();
  expect(await button.getAttribute("aria-expanded")).toBe("true");
  await nav.waitFor({ state: "visible" });
  expect(await nav.locator("[aria-current='page']").innerText()).toBe(here);
  await page.keyboard.press("Escape");
  await nav.waitFor({ state: "hidden" });
  expect(await button.getAttribute("aria-expanded")).toBe("false");
  expect(await button.evaluate((b) => b === document.activeElement), "focus goes back to the button").toBe(true);
}

const slug = (path: string) => (path === "/" ? "today" : path.slice(1).replace(/[^A-Za-z0-9-]+/g, "_")).slice(0, 80);

describe.each(ROLES)("the %s user", (role) => {
  let context: BrowserContext;
  let pages: string[] = [];

  beforeAll(async () => {
    context = await browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    await signIn(page, demoEmail(role));
    pages = await pagesOf(page, role);
  });
  afterAll(async () => {
    await context?.close();
  });

  test("has Today, its areas and their records to look at", () => {
    expect(pages).toEqual(expect.arrayContaining(["/", ...areasOf(role).filter((a) => a.href !== paths.register || role === REGISTER_RECORDS_BY).map((a) => a.href)]));
    // Quality lists no records of its own; the register's are opened by one role.
    const records = pages.filter((p) => RECORDS.some((r) => p.startsWith(r)));
    if (role === REGISTER_RECORDS_BY) expect(records.filter((p) => REGISTER_RECORDS.some((r) => p.startsWith(r)))).toHaveLength(2);
    if (role !== "quality") expect(records.length).toBeGreaterThan(0);
  });

  /** Every page at one width, in a window of its own signed in as the same person. */
  async function walk(width: number): Promise<string[]> {
    const own = await browser.newContext({ viewport: { width, height: width < SIDEBAR_FROM ? 844 : 900 }, storageState: await context.storageState() });
    const page = await own.newPage();
    const problems: string[] = [];
    try {
      for (const path of pages) {
        const res = await visit(page, url(path));
        expect(res?.status(), path).toBe(200);
        await page.waitForFunction(() => document.title.length > 0);
        // Pictures for people to look at, when asked for: they cost more than the checks.
        if (SCREENSHOTS) await page.screenshot({ path: join(SHOTS, `${role}-${width}-${slug(path)}.jpeg`), fullPage: true, type: "jpeg", quality: 70 });
        const found = [...(await problemsOn(page)), ...(await headerProblems(page, width))];
        problems.push(...found.map((p) => `${width} px, ${path}: ${p}`));
        await checkNavigation(page, width, path);
      }
    } finally {
      await own.close();
    }
    return problems;
  }

  // The widths side by side: each has its own window, so they do not wait on each other.
  test(`at ${WIDTHS.join(", ")} px every page fits, keeps its serials whole and folds its navigation below ${SIDEBAR_FROM} px`, async () => {
    const problems = (await Promise.all(WIDTHS.map(walk))).flat();
    expect(problems, problems.join("\n")).toEqual([]);
  }, 240_000);
});
