// usage: node look.tmp.mjs role width path [path...]   (screens to /tmp/look/shots)
import { chromium } from "playwright-core";
import { mkdirSync } from "node:fs";
const [role, width, ...paths] = process.argv.slice(2);
const base = process.env.BASE || "http://127.0.0.1:3900";
mkdirSync("/tmp/look/shots", { recursive: true });
const browser = await chromium.launch({ executablePath: "/usr/bin/chromium", args: ["--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"] });
const page = await (await browser.newContext({ viewport: { width: Number(width), height: 900 } })).newPage();
await page.goto(base + "/sign-in");
await page.getByLabel("E-mail").fill(`${role}@demo.twinleaf.test`);
await page.getByLabel("Password").fill("twinleaf-demo");
await page.getByRole("button", { name: "Sign in" }).click();
await page.getByTestId("today").waitFor();
for (const p of paths) {
  const res = await page.goto(base + p);
  await page.waitForLoadState("networkidle").catch(() => {});
  const wide = await page.evaluate((w) => {
    const out = [];
    for (const el of document.querySelectorAll("body *")) {
      const r = el.getBoundingClientRect();
      if (r.right > w + 1 && r.width > 0) {
        let inScroll = false;
        for (let a = el.parentElement; a; a = a.parentElement) { const s = getComputedStyle(a); if (/(auto|scroll|hidden)/.test(s.overflowX) && a.getBoundingClientRect().right <= w + 1) { inScroll = true; break; } }
        const pr = el.parentElement?.getBoundingClientRect(); if (pr && pr.right <= w + 1) out.push((inScroll ? '[in scroll] ' : '') + `${el.tagName.toLowerCase()}.${String(el.className).slice(0, 60)} right=${Math.round(r.right)} "${(el.textContent || "").trim().slice(0, 50)}"`);
      }
    }
    return { docWidth: document.documentElement.scrollWidth, out: out.slice(0, 8) };
  }, Number(width));
  const name = `${role}-${width}-${p.replace(/[^a-z0-9]+/gi, "_")}.png`;
  await page.screenshot({ path: `/tmp/look/shots/${name}`, fullPage: true });
  console.log(res?.status(), p, "doc", wide.docWidth, "\n  " + wide.out.join("\n  "));
}
await browser.close();
