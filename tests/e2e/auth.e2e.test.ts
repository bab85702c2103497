import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
beforeAll(async () => {
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
});

describe("sign-in", () => {
  test("the right password opens the home page with the user's name", async () => {
    const page = await newPage(browser);
    await signIn(page, demoEmail("lab"));
    await expect(page.getByTestId("user-roles").textContent()).resolves.toBe("Lab");
    const cookie = (await page.context().cookies()).find((c) => c.name === "twinleaf_session");
    expect(cookie?.httpOnly).toBe(true);
    expect(cookie?.sameSite).toBe("Lax");
    await page.context().close();
  });

  test("a wrong password and an unknown user get the same answer", async () => {
    const page = await newPage(browser);
    const answer = async (email: string) => {
      await visit(page, url("/sign-in"));
      await page.getByLabel("E-mail").fill(email);
      await page.getByLabel("Password").fill("not-the-password");
      await page.getByRole("button", { name: "Sign in" }).click();
      return (await page.getByTestId("sign-in-error").textContent())?.trim();
    };
    const wrong = await answer(demoEmail("cabinet"));
    const unknown = await answer("nobody-here@demo.twinleaf.test");
    expect(wrong).toMatch(/do not match an active account/);
    expect(unknown).toBe(wrong);
    expect(page.url()).toContain("/sign-in");
    await page.context().close();
  });

  // Per account, counted on the e-mail typed whether or not it exists, so an unknown address is
  // throttled exactly like a real one (the integration tests cover a real account and the address limit).
  test("after five failures an e-mail is throttled, and the answer changes to say so", async () => {
    const page = await newPage(browser);
    const probe = "throttle-probe@demo.twinleaf.test";
    for (let i = 0; i < 5; i++) {
      await visit(page, url("/sign-in"));
      await page.getByLabel("E-mail").fill(probe);
      await page.getByLabel("Password").fill(`wrong-${i}`);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.getByTestId("sign-in-error").waitFor();
    }
    await visit(page, url("/sign-in"));
    await page.getByLabel("E-mail").fill(probe);
    await page.getByLabel("Password").fill("twinleaf-demo");
    await page.getByRole("button", { name: "Sign in" }).click();
    await expect(page.getByTestId("sign-in-error").textContent()).resolves.toMatch(/Too many tries\. Wait 15 minutes/);
    await page.context().close();
  });

  test("the signed-out are sent to sign-in, and the API answers 401", async () => {
    const page = await newPage(browser);
    await visit(page, url("/admin/users"));
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    const res = await fetch(url("/api/v1/me"));
    expect(res.status).toBe(401);
    await page.context().close();
  });

  test("signing out ends the session", async () => {
    const page = await newPage(browser);
    await signIn(page, demoEmail("service"));
    const before = (await page.context().cookies()).find((c) => c.name === "twinleaf_session")!.value;
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    const res = await fetch(url("/api/v1/me"), { headers: { cookie: `twinleaf_session=${before}` } });
    expect(res.status).toBe(401);
    await page.context().close();
  });
});
