import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, test } from "vitest";
import { AREAS } from "@/lib/areas";
import { ROLE_PERMISSIONS } from "@/lib/auth/permissions";
import { ROLES, type Role } from "@/lib/auth/roles";
import { demoEmail, launchBrowser, newPage, signIn, url, visit } from "./browser-helpers";

let browser: Browser;
const pages = new Map<Role, Page>();

beforeAll(async () => {
  browser = await launchBrowser();
  for (const role of ROLES) {
    const page = await newPage(browser);
    await signIn(page, demoEmail(role));
    pages.set(role, page);
  }
});
afterAll(async () => {
  await browser?.close();
});

const allowed = (role: Role) => AREAS.filter((a) => ROLE_PERMISSIONS[role].includes(a.permission));

describe.each(ROLES)("the %s user", (role) => {
  test("sees exactly the areas of the role in the navigation", async () => {
    const page = pages.get(role)!;
    await visit(page, url("/"));
    const links = await page.getByTestId("area-nav").getByRole("link").allTextContents();
    expect(links).toEqual(["Today", ...allowed(role).map((a) => a.label)]);
  });

  test("opens each own area, and gets 403 for every other area", async () => {
    const page = pages.get(role)!;
    for (const area of AREAS) {
      const res = await visit(page, url(area.href));
      if (allowed(role).includes(area)) {
        expect(res?.status(), area.href).toBe(200);
        await page.getByTestId(`area-${area.key}`).waitFor();
      } else {
        expect(res?.status(), area.href).toBe(403);
        await page.getByTestId("forbidden").waitFor();
      }
    }
  });

  test("gets 403 from an API route of another role, and 200 from its own", async () => {
    const page = pages.get(role)!;
    const me = await page.request.get(url("/api/v1/me"));
    expect(me.status()).toBe(200);
    expect((await me.json()).roles).toEqual([role]);
    const adminUsers = await page.request.get(url("/api/v1/admin/users"));
    expect(adminUsers.status()).toBe(role === "admin" ? 200 : 403);
  });
});
