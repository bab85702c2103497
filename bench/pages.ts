/**
 * Pages benchmark: serves a register of ≥ 1,000,000 items (bench/pages-register.ts) with
 * `next start`, signs in one session per role, and times the server's answer (time to last byte)
 * of the pages and JSON routes a workshop opens most; then reports each route's first-load
 * JavaScript from the production build (bench/pages-js.ts). Run with `npm run bench:pages`; never
 * part of `npm test`. The last line printed is one JSON object.
 *
 *   --db <file>     use this database file: built there first if it does not exist, kept afterwards
 *   --skip-build    serve the last `next build` instead of building again
 *   --keep          keep the temporary folder (its path is printed)
 *   --browser       also load a few pages in headless Chromium and add up the JavaScript it fetched
 *   --only <a,b>    time only the pages and routes whose name contains one of these (while iterating)
 */
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { performance } from "node:perf_hooks";
import { openDb } from "@/db";
import { migrateDatabase } from "@/db/migrate";
import { SESSION_COOKIE } from "@/lib/auth/lucia-cookie";
import { startSession } from "@/lib/auth/sessions";
import { paths } from "@/lib/paths";
import { buildPagesRegister, PAGES_SHAPE } from "./pages-register";
import { nextBuild, startApp, type RunningApp } from "./pages-server";
import { browserFirstLoadKb } from "./pages-browser";
import { firstLoadJs } from "./pages-js";
import { pickTargets, type Targets } from "./pages-targets";

const WARM_UP = 5;
const SAMPLES = 50;
// Issue 16: each page ≤ 150 ms p95, each JSON route ≤ 30 ms p95, every route's first load ≤ 200 kB of gzipped JS.
const TARGET_PAGE_P95 = 150;
const TARGET_API_P95 = 30;
const TARGET_JS_KB = 200;
const ROLES = ["veneer", "cabinet", "lab", "assembly", "packing", "service", "quality", "admin"] as const;
type Role = (typeof ROLES)[number];

/** Nearest-rank percentile. */
function percentile(samples: number[], q: number): number {
  const sorted = [...samples].sort((a, b) => a - b);
  return sorted[Math.max(0, Math.ceil(q * sorted.length) - 1)]!;
}

interface Probe {
  name: string;
  kind: "page" | "api";
  role: Role;
  /** One or more URLs, taken in turn, so a page is not timed on one cached answer alone. */
  urls: string[];
  /** What a real answer holds: a sign-in page, an error page or an empty list would not. */
  expect: (body: string, url: string) => string | null;
}

const hasTestId = (id: string) => (body: string) => (body.includes(`data-testid="${id}"`) ? null : `no data-testid="${id}"`);

function probes(t: Targets): Probe[] {
  const item = (name: string, identities: string[]): Probe => ({
    name, kind: "page", role: "quality", urls: identities.map(paths.item),
    expect: (body, url) => {
      const id = decodeURIComponent(url.split("/").at(-1)!);
      return !body.includes('data-testid="item-page"') ? 'no data-testid="item-page"' : body.includes(id) ? null : `no ${id} on the page`;
    },
  });
  const home = (role: Role, path: string, testId: string): Probe => ({ name: path, kind: "page", role, urls: [path], expect: hasTestId(testId) });
  const json = (name: string, role: Role, urls: string[], check: (data: Record<string, unknown>) => string | null): Probe => ({
    name, kind: "api", role, urls,
    expect: (body) => {
      try {
        return check(JSON.parse(body) as Record<string, unknown>);
      } catch {
        return "not JSON";
      }
    },
  });
  const listOf = (key: string, min: number) => (data: Record<string, unknown>) =>
    Array.isArray(data[key]) && (data[key] as unknown[]).length >= min ? null : `fewer than ${min} ${key}`;
  return [
    item("/register/items/[pair]", t.pairs),
    item("/register/items/[speaker]", t.speakers),
    item(`/register/items/[lot held by ${t.bulkLot.serials.toLocaleString("en")} serials]`, [t.bulkLot.identity]),
    { name: "/cabinet/pairs/[identity]", kind: "page", role: "cabinet", urls: [paths.cabinetPair(t.cabinetPair)], expect: hasTestId("route-page") },
    { name: "/service/cases/[code]", kind: "page", role: "service", urls: [paths.serviceCase(t.serviceCase)], expect: hasTestId("case-page") },
    home("veneer", paths.veneer, "area-veneer"),
    home("cabinet", paths.cabinet, "area-cabinet"),
    home("lab", paths.lab, "area-lab"),
    home("assembly", paths.assembly, "area-assembly"),
    home("packing", paths.packing, "area-packing"),
    home("service", paths.service, "service-home"),
    home("quality", paths.quality, "area-quality"),
    home("admin", paths.admin, "area-admin"),
    home("quality", paths.register, "area-register"),
    home("quality", paths.today, "today"),
    // The JSON routes: the genealogy a client draws (a pair's contents), a recall's holders of one
    // drive unit, and the search box.
    json("/api/v1/items/[pair]/trace?shape=tree", "quality", t.pairs.map((p) => `/api/v1/items/${encodeURIComponent(p)}/trace?shape=tree`), (d) =>
      d.tree && typeof d.tree === "object" ? null : "no tree"),
    json("/api/v1/items/[drive unit]/trace?direction=forward", "quality", t.driveUnits.map((u) => `/api/v1/items/${encodeURIComponent(u)}/trace?direction=forward`),
      listOf("nodes", 3)),
    json("/api/v1/search?q=[serial]", "quality", t.pairs.map((p) => `/api/v1/search?q=${encodeURIComponent(p)}`), (d) =>
      JSON.stringify(d).includes("identity") ? null : "no hit"),
    // Six characters from the middle of a serial, without its hyphens: a fragment, read from the index.
    json("/api/v1/search?q=[fragment]", "quality", t.pairs.map((p) => `/api/v1/search?q=${encodeURIComponent(p.replace(/-/g, "").slice(3, 9))}`), (d) =>
      JSON.stringify(d).includes("identity") ? null : "no hit"),
  ];
}

async function time(app: RunningApp, cookie: string, probe: Probe): Promise<number[]> {
  const samples: number[] = [];
  for (let i = 0; i < WARM_UP + SAMPLES; i++) {
    const url = probe.urls[i % probe.urls.length]!;
    const t0 = performance.now();
    const res = await fetch(app.baseUrl + url, { redirect: "manual", headers: { cookie: `${SESSION_COOKIE}=${cookie}` } });
    const body = await res.text();
    const ms = performance.now() - t0;
    if (res.status !== 200) throw new Error(`${probe.name}: ${url} answered ${res.status}${res.headers.get("location") ? ` → ${res.headers.get("location")}` : ""}: ${body.slice(0, 200)}`);
    const wrong = probe.expect(body, url);
    if (wrong) throw new Error(`${probe.name}: ${url} answered 200 without its content (${wrong})`);
    if (i >= WARM_UP) samples.push(ms);
  }
  return samples;
}

async function main() {
  const args = process.argv.slice(2);
  const flag = (name: string) => args.includes(name);
  const option = (name: string) => {
    const i = args.indexOf(name);
    return i >= 0 ? args[i + 1] : undefined;
  };
  const dir = mkdtempSync(join(tmpdir(), "twinleaf-bench-pages-"));
  const dbFile = option("--db") ? resolve(option("--db")!) : join(dir, "pages.db");
  const only = option("--only")?.split(",");
  let app: RunningApp | null = null;
  const cleanUp = async () => {
    await app?.stop();
    app = null;
    if (flag("--keep")) console.log(`Kept ${dir}`);
    else rmSync(dir, { recursive: true, force: true });
  };
  process.once("SIGINT", () => void cleanUp().then(() => process.exit(130)));
  try {
    if (!existsSync(dbFile)) {
      const built = await buildPagesRegister(dbFile, PAGES_SHAPE);
      console.log(`Built ${dbFile}: ${built.items.toLocaleString("en")} items in ${built.seconds.toFixed(0)} s`);
    } else {
      console.log(`Reusing ${dbFile} (bringing it up to the latest migration)`);
      await migrateDatabase(`file:${dbFile}`);
    }
    const url = `file:${dbFile}`;
    if (!flag("--skip-build")) {
      console.log("next build…");
      await nextBuild();
    }

    // What to open, and one real session per role, made by lib/auth as a sign-in would.
    const { client, db } = openDb(url);
    let targets: Targets;
    const cookies = new Map<Role, string>();
    try {
      targets = await pickTargets(db);
      for (const role of ROLES) {
        const userId = targets.users[role];
        if (!userId) throw new Error(`bench: no demo user for ${role}`);
        cookies.set(role, (await startSession(userId, db)).session.id);
      }
    } finally {
      client.close();
    }

    app = await startApp(url, dir);
    console.log(`Serving at ${app.baseUrl}; ${WARM_UP} warm-up and ${SAMPLES} timed requests each, one at a time`);
    const pages: Record<string, number> = {};
    const api: Record<string, number> = {};
    const rows: string[] = [];
    for (const probe of probes(targets)) {
      if (only && !only.some((o) => probe.name.includes(o))) continue;
      const samples = await time(app, cookies.get(probe.role)!, probe);
      const p95 = Math.round(percentile(samples, 0.95) * 10) / 10;
      const p50 = Math.round(percentile(samples, 0.5) * 10) / 10;
      (probe.kind === "page" ? pages : api)[probe.name] = p95;
      const target = probe.kind === "page" ? TARGET_PAGE_P95 : TARGET_API_P95;
      const row = `${probe.name.padEnd(62)} ${String(p50).padStart(8)} ${String(p95).padStart(8)}  ${p95 <= target ? "ok" : `MISSES ≤ ${target} ms`}`;
      rows.push(row);
      console.log(row);
    }
    // The same routes' first load as a browser fetches it, to check the figure computed from the build.
    const browserPaths = [paths.register, paths.item(targets.pairs[0]!), paths.cabinetPair(targets.cabinetPair)];
    const seen = flag("--browser") ? await browserFirstLoadKb(app.baseUrl, cookies.get("quality")!, browserPaths) : null;
    await app.stop();
    app = null;

    const js = firstLoadJs(resolve(".next"));
    const firstLoad: Record<string, number> = {};
    console.log("");
    console.log(`${"page or route".padEnd(62)} ${"p50 ms".padStart(8)} ${"p95 ms".padStart(8)}`);
    for (const row of rows) console.log(row);
    console.log("");
    console.log(`${"route (first load, gzip)".padEnd(62)} ${"kB".padStart(8)}`);
    for (const r of js) {
      firstLoad[r.route] = r.kb;
      console.log(`${r.route.padEnd(62)} ${r.kb.toFixed(1).padStart(8)}  ${r.kb <= TARGET_JS_KB ? "ok" : `MISSES ≤ ${TARGET_JS_KB} kB`}`);
    }
    if (seen) {
      console.log("");
      for (const [path, kb] of seen) console.log(`${`browser, first visit of ${path}`.padEnd(62)} ${kb.toFixed(1).padStart(8)}  (transferred JavaScript)`);
    }
    console.log("");
    console.log(JSON.stringify({ items: targets.items, pages_p95_ms: pages, api_p95_ms: api, first_load_js_kb: firstLoad }));
  } finally {
    await cleanUp();
  }
}

await main();
