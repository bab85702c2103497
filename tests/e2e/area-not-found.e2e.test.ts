/**
 * An unknown serial under an area answers 404 with that area's own "not found": what was asked
 * for, and the way back to the area. The serials below are well-formed and carry no record.
 */
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { areaByKey } from "@/lib/areas";
import type { Role } from "@/lib/auth/roles";
import { paths } from "@/lib/paths";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("an unknown serial under an area", () => {
  test.each<[string, Role, string, string, string]>([
    ["veneer", "veneer", paths.flitch("F-WAL-26-99999-X"), "flitch", "F-WAL-26-99999-X"],
    ["cabinet", "cabinet", paths.cabinetPair("P-ZZ9-26-99999-X"), "cabinet pair", "P-ZZ9-26-99999-X"],
    ["lab", "lab", paths.labBatch("B-TW-26-9999"), "batch", "B-TW-26-9999"],
    ["assembly", "assembly", paths.assemblyPair("P-ZZ9-26-99999-X"), "pair", "P-ZZ9-26-99999-X"],
    ["packing", "packing", paths.pack("P-ZZ9-26-99999-X"), "pair", "P-ZZ9-26-99999-X"],
    ["register", "quality", paths.item("S-ZZ9-26-99999-X"), "item", "S-ZZ9-26-99999-X"],
    ["admin", "admin", `${paths.adminRoutes}/ZZ9/edit`, "model", "ZZ9"],
  ])("in the %s area (as %s) answers 404 with the area's own page", async (areaKey, role, path, what, asked) => {
    const page = await newPage(browser);
    await signIn(page, demoEmail(role));
    const res = await visit(page, url(path));
    expect(res?.status()).toBe(404);
    const notFound = page.getByTestId("area-not-found");
    await notFound.waitFor();
    const area = areaByKey(areaKey);
    expect(await notFound.locator("h1").innerText()).toBe(`No ${what} ${asked}`);
    expect(await notFound.getByText(`Not found in ${area.label}`).isVisible()).toBe(true);
    const back = page.getByTestId("area-not-found-back");
    expect(await back.getAttribute("href")).toBe(area.href);
    await back.click();
    await page.getByTestId(`area-${areaKey}`).waitFor();
    await page.context().close();
  });

  test("a user or owner that is not there is named by what it is, never by its id", async () => {
    const page = await newPage(browser);
    await signIn(page, demoEmail("admin"));
    const res = await visit(page, url(`${paths.adminUsers}/no-such-user-7f3a`));
    expect(res?.status()).toBe(404);
    const notFound = page.getByTestId("area-not-found");
    expect(await notFound.locator("h1").innerText()).toBe("This user is not registered");
    expect(await notFound.innerText()).not.toContain("7f3a");
    await page.context().close();
  });
});
