import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { axeViolations, demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("accessibility (axe-core)", () => {
  test("the sign-in page has no WCAG A/AA violations, also when showing errors", async () => {
    const page = await newPage(browser);
    await visit(page, url("/sign-in"));
    expect(await axeViolations(page)).toEqual([]);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("Enter your password.").waitFor();
    expect(await axeViolations(page)).toEqual([]);
    await page.context().close();
  });

  test.each(["admin", "veneer"])("the home page of the %s user has no WCAG A/AA violations", async (role) => {
    const page = await newPage(browser);
    await signIn(page, demoEmail(role));
    expect(await axeViolations(page)).toEqual([]);
    await page.context().close();
  });
});

describe("accessibility of the veneer room (axe-core)", () => {
  test("the flitch list, a flitch with its plan and leaf table, intake and lacquer batches have no WCAG A/AA violations", async () => {
    const page = await newPage(browser);
    await signIn(page, demoEmail("veneer"));
    for (const path of ["/veneer", "/veneer/receive", "/cabinet/lacquer"]) {
      await visit(page, url(path));
      expect(await axeViolations(page), path).toEqual([]);
    }
    await visit(page, url("/veneer"));
    await page.getByTestId("flitch-table").locator("a").first().click();
    await page.getByTestId("plan-picture").waitFor();
    expect(await axeViolations(page), "flitch page").toEqual([]);
    await page.context().close();
  });
});
