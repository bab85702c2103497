/**
 * The admin's reference data in a browser: a model added with one trim position and then edited
 * (version 2 shows in its history), a dealer refused for a country that is not an ISO 3166-1 code
 * and then added, and a finish added and retired. Codes are the test's own, so other tests' demo
 * data is left as it was.
 */
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, expect, test } from "vitest";
import { paths } from "@/lib/paths";
import { demoEmail, launchBrowser, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
let page: Page;
beforeAll(async () => {
  browser = await launchBrowser();
  page = await (await browser.newContext({ viewport: { width: 1024, height: 1200 } })).newPage();
  await signIn(page, demoEmail("admin"));
});
afterAll(async () => {
  await browser?.close();
});

test("a model with one trim position is added, then edited as version 2", async () => {
  await visit(page, url(paths.adminModels));
  await page.getByTestId("new-model").click();
  const form = page.getByTestId("model-form");
  await form.waitFor();
  await page.getByTestId("model-code").fill("QE5");
  await page.getByTestId("model-name").fill("Quarry Edge");
  await form.getByLabel("Smallest leaf length (mm)").fill("620");
  await form.getByLabel("Smallest leaf width (mm)").fill("140");
  // docs/REFERENCES.md, § GS1: a valid GTIN-14 published by GS1, first with its check digit slipped.
  await page.getByTestId("model-gtin").fill("03453120000012");
  await page.getByTestId("add-trim").click();
  await page.getByTestId("trim-position-0").fill("TOP");
  await page.getByTestId("trim-label-0").fill("Top housing");
  await form.getByRole("button", { name: "Register the model" }).click();
  await page.getByTestId("model-form-error").waitFor();
  expect(await form.getByText("for 0345312000001 it is 1, not 2").count()).toBe(1);
  await page.getByTestId("model-gtin").fill("03453120000011");
  await form.getByRole("button", { name: "Register the model" }).click();
  await page.waitForURL(/\/admin\/models\/QE5$/);
  await page.getByTestId("model-version-1").waitFor();
  expect(await page.getByTestId("trim-position-0").inputValue()).toBe("TOP");

  await page.getByTestId("model-form").getByLabel("Warranty (months)").fill("36");
  await page.getByTestId("model-note").fill("Three years for this line");
  await page.getByTestId("model-form").getByRole("button", { name: "Save as a new version" }).click();
  await page.getByTestId("model-saved").waitFor();
  const v2 = page.getByTestId("model-version-2");
  expect(await v2.innerText()).toContain("warranty");
  expect(await v2.innerText()).toContain("Three years for this line");
});

test("a dealer with a country that is not an ISO code is refused beside the field, then added", async () => {
  await visit(page, url(paths.adminDealers));
  await page.getByTestId("dealer-code").fill("QED");
  await page.getByTestId("dealer-name").fill("Quayside Listening");
  await page.getByTestId("dealer-address").fill("7 Harbour Steps");
  await page.getByTestId("dealer-postcode").fill("QY1 2AB");
  await page.getByTestId("dealer-city").fill("Quayby");
  await page.getByTestId("dealer-country").fill("UK");
  await page.getByTestId("dealer-email").fill("orders@quayside.test");
  await page.getByTestId("dealer-form").getByRole("button", { name: "Add the dealer" }).click();
  await page.getByTestId("dealer-form-error").waitFor();
  const country = page.getByTestId("dealer-country");
  expect(await country.getAttribute("aria-invalid")).toBe("true");
  const errorId = (await country.getAttribute("aria-describedby"))!.split(" ").find((id) => id.endsWith("-error"))!;
  // docs/REFERENCES.md, § Countries (ISO 3166-1): UK is exceptionally reserved; the United Kingdom is GB.
  expect(await page.locator(`[id="${errorId}"]`).innerText()).toBe("UK is not an ISO 3166-1 code: United Kingdom is GB.");
  expect(await page.getByTestId("dealer-name").inputValue()).toBe("Quayside Listening");
  await country.fill("GB");
  await page.getByTestId("dealer-form").getByRole("button", { name: "Add the dealer" }).click();
  await page.getByTestId("dealer-saved").waitFor();
  expect(await page.getByTestId("admin-dealer-table").innerText()).toContain("Quayside Listening");
});

test("a finish is added and retired", async () => {
  await visit(page, url(paths.adminFinishes));
  await page.getByTestId("finish-form").getByLabel("Kind").selectOption("lacquer");
  await page.getByTestId("finish-code").fill("QRD");
  await page.getByTestId("finish-name").fill("Quince Red");
  await page.getByTestId("finish-colour").fill("#8E2B2B");
  await page.getByTestId("finish-form").getByRole("button", { name: "Add the finish" }).click();
  await page.getByTestId("finish-saved").waitFor();
  await page.getByTestId("edit-finish-QRD").click();
  await page.getByTestId("retire-finish-form").waitFor();
  await page.getByTestId("retire-finish-reason").fill("Colour withdrawn by the workshop");
  await page.getByTestId("retire-finish-form").getByRole("button", { name: "Retire Quince Red" }).click();
  await page.getByTestId("retire-finish-message").waitFor();
  expect(await page.getByTestId("retire-finish-message").innerText()).toContain("Quince Red is retired");
  const row = page.getByTestId("admin-finish-table").locator("tr", { hasText: "Quince Red" });
  expect(await row.innerText()).toContain("retired");
});
