/**
 * First-load JavaScript of each page route, from the production build in `.next/`, as a browser
 * fetches it on a first visit: the framework's root chunks (build-manifest.json `rootMainFiles`;
 * the `polyfillFiles` are `nomodule` scripts a current browser skips) and every chunk the route's
 * client reference manifest names for the layouts, boundaries and page of its tree
 * (`server/app/<route>/page_client-reference-manifest.js`, `entryJSFiles`), each counted once
 * and gzipped at level 9 as the size on the wire.
 */
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { createRequire } from "node:module";
import { gzipSync } from "node:zlib";

export interface RouteJs {
  route: string;
  chunks: string[];
  kb: number;
}

const gzCache = new Map<string, number>();
function gzBytes(nextDir: string, chunk: string): number {
  let n = gzCache.get(chunk);
  if (n === undefined) {
    n = gzipSync(readFileSync(join(nextDir, chunk)), { level: 9 }).length;
    gzCache.set(chunk, n);
  }
  return n;
}

/** The chunks a first load of each page route fetches, and their gzipped size in kB (1,000 bytes). */
export function firstLoadJs(nextDir: string): RouteJs[] {
  const build = JSON.parse(readFileSync(join(nextDir, "build-manifest.json"), "utf8")) as { rootMainFiles: string[] };
  const routes = JSON.parse(readFileSync(join(nextDir, "app-path-routes-manifest.json"), "utf8")) as Record<string, string>;
  const require = createRequire(import.meta.url);
  const out: RouteJs[] = [];
  for (const [entry, route] of Object.entries(routes)) {
    if (!entry.endsWith("/page")) continue; // route handlers send no JavaScript
    const g = globalThis as { __RSC_MANIFEST?: Record<string, { entryJSFiles?: Record<string, string[]> }> };
    g.__RSC_MANIFEST = {};
    require(join(nextDir, "server/app", `${entry}_client-reference-manifest.js`));
    const manifest = g.__RSC_MANIFEST[entry];
    if (!manifest?.entryJSFiles) throw new Error(`bench: no client reference manifest for ${entry}`);
    const chunks = new Set<string>(build.rootMainFiles);
    for (const files of Object.values(manifest.entryJSFiles)) for (const f of files) chunks.add(f);
    const bytes = [...chunks].reduce((sum, c) => sum + gzBytes(nextDir, c), 0);
    out.push({ route, chunks: [...chunks], kb: Math.round(bytes / 100) / 10 });
  }
  return out.sort((a, b) => a.route.localeCompare(b.route));
}

// `tsx bench/pages-js.ts` prints the table alone, from the last build.
if (process.argv[1]?.endsWith("pages-js.ts")) {
  for (const r of firstLoadJs(join(process.cwd(), ".next"))) console.log(`${r.route.padEnd(50)} ${r.kb.toFixed(1).padStart(7)} kB  (${r.chunks.length} chunks)`);
}
