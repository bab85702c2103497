import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

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

/** What a bench does: call the lab's whoami with its token. */
async function whoami(token: string) {
  const res = await fetch(url("/api/v1/lab/whoami"), { headers: { authorization: `Bearer ${token}` } });
  return { status: res.status, body: (await res.json()) as Record<string, unknown> };
}

describe("machine tokens", () => {
  test("the admin makes a token, reads it once, a bench uses it, and revoking it shuts the bench out", async () => {
    const name = "Lab bench 2";
    await visit(admin, url("/admin"));
    await admin.getByRole("link", { name: "Open" }).and(admin.locator('[href="/admin/tokens"]')).click();
    await admin.getByRole("heading", { name: "Machine tokens", level: 1 }).waitFor();

    const form = admin.getByTestId("create-token-form");
    await form.getByLabel("Name").fill(name);
    await form.getByRole("button", { name: "Make token" }).click();
    const shown = admin.getByTestId("new-token");
    await shown.waitFor();
    await expect(shown.textContent()).resolves.toContain("Copy it now: Twinleaf keeps only a fingerprint and cannot show it again.");
    const token = await admin.getByTestId("new-token-value").inputValue();
    expect(token).toMatch(/^tlm_[A-Za-z0-9_-]{43}$/);

    await expect(whoami(token)).resolves.toEqual({ status: 200, body: { kind: "machine", name, scope: "lab" } });

    // Shown once: after a reload the list has only its first characters.
    await admin.reload();
    const table = admin.getByTestId("token-table");
    const row = table.getByRole("row").filter({ hasText: name });
    await row.waitFor();
    await expect(row.textContent()).resolves.toContain(`tlm_${token.slice(4, 12)}…`);
    await expect(admin.getByTestId("new-token").count()).resolves.toBe(0);
    expect(await admin.content()).not.toContain(token.slice(4));

    await row.getByRole("button", { name: `Revoke ${name}` }).click();
    const revoke = admin.getByTestId("revoke-token-form");
    await revoke.getByLabel("Why (optional)").fill("bench retired");
    await revoke.getByRole("button", { name: "Revoke now" }).click();
    await admin.getByTestId("toast").filter({ hasText: "Revoked" }).waitFor();
    await row.getByText("revoked", { exact: true }).waitFor();
    await expect(row.getByRole("button", { name: `Revoke ${name}` }).count()).resolves.toBe(0);

    await expect(whoami(token)).resolves.toEqual({ status: 401, body: { error: "This machine token is not valid (unknown or revoked)." } });
  });

  test("a lab token cannot reach the rest of the API", async () => {
    await visit(admin, url("/admin/tokens"));
    await admin.getByTestId("create-token-form").getByLabel("Name").fill("Lab bench 3");
    await admin.getByRole("button", { name: "Make token" }).click();
    const token = await admin.getByTestId("new-token-value").inputValue();
    const res = await fetch(url("/api/v1/me"), { headers: { authorization: `Bearer ${token}` } });
    expect(res.status).toBe(403);
    await expect(res.json()).resolves.toEqual({ error: "Machine tokens may only reach the lab's endpoints." });
  });
});
