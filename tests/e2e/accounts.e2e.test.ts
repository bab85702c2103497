import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { demoEmail, launchBrowser, linkIn, newPage, signIn, url, waitForMail, visit } from "./browser-helpers";

let browser: Browser;
let admin: Page;

beforeAll(async () => {
  browser = await launchBrowser();
  admin = await newPage(browser);
  await signIn(admin, demoEmail("admin"));
});
afterAll(async () => {
  await browser?.close();
});

async function invite(name: string, email: string, roleLabels: string[]) {
  await visit(admin, url("/admin/users"));
  await admin.getByRole("button", { name: "Invite someone" }).click();
  const form = admin.getByTestId("invite-form");
  await form.getByLabel("Name").fill(name);
  await form.getByLabel("E-mail").fill(email);
  for (const label of roleLabels) await form.getByLabel(label).check();
  await form.getByRole("button", { name: "Send invitation" }).click();
  await admin.getByTestId("toast").filter({ hasText: email }).waitFor();
}

/** Invites someone and accepts the invitation in a browser of their own; returns their signed-in page. */
async function join(name: string, email: string, roleLabels: string[], password = "a long enough password"): Promise<Page> {
  await invite(name, email, roleLabels);
  const link = linkIn(await waitForMail(email, /invitation/i), "/invite/");
  const page = await newPage(browser);
  await visit(page, link);
  await page.getByLabel("New password").fill(password);
  await page.getByLabel("The same again").fill(password);
  await page.getByRole("button", { name: "Set password and sign in" }).click();
  await page.getByTestId("today").waitFor();
  return page;
}

async function openUser(name: string) {
  await visit(admin, url("/admin/users"));
  await admin.getByRole("link", { name }).click();
  await admin.getByRole("heading", { name }).waitFor();
}

describe("accounts", () => {
  test("an invitation arrives by e-mail, and its one-time link sets a password and signs in", async () => {
    const email = "wren.invited@workshop.test";
    await invite("Wren Aldous", email, ["Veneer room", "Lab"]);

    const mail = await waitForMail(email, /invitation/i);
    expect(mail.text).toContain("Wren Aldous");
    const link = linkIn(mail, "/invite/");

    const page = await newPage(browser);
    await visit(page, link);
    await page.getByLabel("New password").fill("a long enough password");
    await page.getByLabel("The same again").fill("a long enough password");
    await page.getByRole("button", { name: "Set password and sign in" }).click();
    await page.getByTestId("today").waitFor();
    await expect(page.getByTestId("user-roles").textContent()).resolves.toBe("Veneer room · Lab");

    // The link works once.
    const again = await newPage(browser);
    await visit(again, link);
    await again.getByTestId("token-gone").waitFor();
    await page.context().close();
    await again.context().close();
  });

  test("a password reset by e-mail works once and the old password stops working", async () => {
    const email = "ash.reset@workshop.test";
    await (await join("Ash Merriweather", email, ["Assembly"], "first password here")).context().close();
    const page = await newPage(browser);
    await visit(page, url("/reset"));
    await page.getByLabel("E-mail").fill(email);
    await page.getByRole("button", { name: "Send me a link" }).click();
    await page.getByTestId("reset-requested").waitFor();

    const link = linkIn(await waitForMail(email, /password/i), "/reset/");
    await visit(page, link);
    await page.getByLabel("New password").fill("assembly bench seven");
    await page.getByLabel("The same again").fill("assembly bench seven");
    await page.getByRole("button", { name: "Save and sign in" }).click();
    await page.getByTestId("today").waitFor();

    const other = await newPage(browser);
    await visit(other, url("/sign-in"));
    await other.getByLabel("E-mail").fill(email);
    await other.getByLabel("Password").fill("first password here");
    await other.getByRole("button", { name: "Sign in" }).click();
    await other.getByTestId("sign-in-error").waitFor();
    await signIn(other, email, "assembly bench seven");

    await visit(page, link);
    await page.getByTestId("token-gone").waitFor();
    await page.context().close();
    await other.context().close();
  });

  test("a change of roles applies on the user's next request", async () => {
    const user = await join("Rowan Pike", "rowan.roles@workshop.test", ["Packing"]);
    expect((await visit(user, url("/lab")))?.status()).toBe(403);

    await openUser("Rowan Pike");
    await admin.getByTestId("roles-form").getByLabel("Lab").check();
    await admin.getByRole("button", { name: "Save roles" }).click();
    await admin.getByTestId("toast").filter({ hasText: "Roles saved" }).waitFor();

    expect((await visit(user, url("/lab")))?.status()).toBe(200);
    await visit(user, url("/"));
    const links = await user.getByTestId("area-nav").getByRole("link").allTextContents();
    expect(links).toContain("Lab");
    await user.context().close();
  });

  test("deactivating a user ends their open session", async () => {
    const user = await join("Sloane Tidwell", "sloane.leaving@workshop.test", ["Cabinet shop"]);
    expect((await visit(user, url("/cabinet")))?.status()).toBe(200);

    await openUser("Sloane Tidwell");
    await admin.getByRole("button", { name: "Deactivate…" }).click();
    await admin.getByTestId("deactivate-form").getByLabel("Why").fill("left the workshop");
    await admin.getByRole("button", { name: "Deactivate now" }).click();
    await admin.getByTestId("toast").filter({ hasText: "Deactivated" }).waitFor();

    await visit(user, url("/cabinet"));
    expect(new URL(user.url()).pathname).toBe("/sign-in");
    const res = await user.request.get(url("/api/v1/me"));
    expect(res.status()).toBe(401);
    await user.context().close();
  });
});
