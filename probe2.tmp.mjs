import { chromium } from "playwright-core";
const base = "http://127.0.0.1:3900";
const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", args: ["--no-sandbox","--disable-gpu"] });
for (const [role, paths] of [["veneer", ["/lab", "/lab/batches/NOPE"]], ["lab", ["/lab", "/lab/batches/NOPE", "/lab/match"]]]) {
  const ctx = await browser.newContext(); const page = await ctx.newPage();
  await page.goto(base + "/sign-in");
  await page.getByLabel("E-mail").fill(`${role}@demo.twinleaf.test`);
  await page.getByLabel("Password").fill("twinleaf-demo");
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.getByTestId("today").waitFor();
  for (const p of paths) { const r = await ctx.request.get(base + p, { maxRedirects: 0 }); console.log(role, p, r.status()); }
  await ctx.close();
}
await browser.close();
