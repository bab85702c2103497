/**
 * The route editor in a browser, on a tablet held upright (800 px): a refused field is marked
 * beside itself and stays with its reading when the steps move; an edit undone is refused as
 * "nothing to save", so this test writes nothing.
 */
import type { Browser } from "playwright-core";
import { afterAll, beforeAll, expect, test } from "vitest";
import { paths } from "@/lib/paths";
import { demoEmail, launchBrowser, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

test("a refused limit stays on its reading when the steps move, and undoing the edit saves nothing", async () => {
  const page = await (await browser.newContext({ viewport: { width: 800, height: 1000 } })).newPage();
  await signIn(page, demoEmail("admin"));
  await visit(page, url(paths.adminRoutes));
  await page.locator("[data-testid^='edit-route-']").first().click();
  await page.getByTestId("route-edit-form").waitFor();
  const editUrl = page.url();

  // Step 2 of the usual route is trimming: one reading, ±0.2 mm (lib/route/default-spec.ts).
  const limitOf = (step: number) => page.getByTestId(`edit-step-${step}-reading-1`).getByLabel("± limit", { exact: true });
  expect(await limitOf(2).inputValue()).toBe("0.2");
  await limitOf(2).fill("abc");
  await page.getByTestId("route-note").fill("Trying the editor");
  await page.getByTestId("save-route").click();
  await page.getByTestId("route-edit-error").waitFor();
  expect(await page.getByTestId("route-edit-error").innerText()).toContain("One field is marked below. Nothing was saved.");
  expect(await limitOf(2).getAttribute("aria-invalid")).toBe("true");
  const errorId = (await limitOf(2).getAttribute("aria-describedby"))!.split(" ").find((id) => id.endsWith("-error"))!;
  expect(await page.locator(`[id="${errorId}"]`).innerText()).toMatch(/Enter a number/);

  // Moved first, the trimming step keeps its reading's error.
  await page.getByRole("button", { name: "Move step 2 up" }).click();
  expect(await limitOf(1).inputValue()).toBe("abc");
  expect(await limitOf(1).getAttribute("aria-invalid")).toBe("true");
  expect(await limitOf(2).getAttribute("aria-invalid")).toBeNull();

  // Put back as it was: the mark goes once the field is edited, and the server finds nothing new.
  await limitOf(1).fill("0.2");
  expect(await limitOf(1).getAttribute("aria-invalid")).toBeNull();
  await page.getByRole("button", { name: "Move step 1 down" }).click();
  await page.getByTestId("save-route").click();
  await page.getByText(/^Nothing to save: the steps are the same as version \d+/).waitFor();
  expect(page.url()).toBe(editUrl);
  await page.context().close();
});
