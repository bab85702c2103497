/**
 * The browser's side of the first-load figure: opens a page in Debian's headless Chromium with a
 * session cookie and adds up the JavaScript it fetched (the transferred, compressed bytes) until
 * the network is idle. `bench:pages --browser` prints it beside the figure computed from the build.
 */
import { chromium } from "playwright-core";
import { SESSION_COOKIE } from "@/lib/auth/lucia-cookie";

export async function browserFirstLoadKb(baseUrl: string, sessionId: string, paths: string[]): Promise<Map<string, number>> {
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH || "/usr/bin/chromium",
    args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
  });
  const out = new Map<string, number>();
  try {
    for (const path of paths) {
      const context = await browser.newContext();
      await context.addCookies([{ name: SESSION_COOKIE, value: sessionId, url: baseUrl }]);
      const page = await context.newPage();
      const sizes: Promise<number>[] = [];
      page.on("response", (res) => {
        if (res.request().resourceType() === "script") sizes.push(res.request().sizes().then((s) => s.responseBodySize));
      });
      await page.goto(baseUrl + path, { waitUntil: "networkidle" });
      out.set(path, Math.round((await Promise.all(sizes)).reduce((a, b) => a + b, 0) / 100) / 10);
      await context.close();
    }
  } finally {
    await browser.close();
  }
  return out;
}
