/**
 * Finds the server actions, route handlers and pages under app/ from the files themselves, and
 * names them the way tests/access/table.ts does, so the walks can tell what the table misses.
 */
import { readdirSync, readFileSync } from "node:fs";
import { join, relative, sep } from "node:path";
import { fileURLToPath } from "node:url";

export const ROOT = fileURLToPath(new URL("../../", import.meta.url));
const APP = join(ROOT, "app");
const toPosix = (p: string) => p.split(sep).join("/");

/** Every source file under app/, as a path from the project's root ("app/…"). */
export const sourceFiles: string[] = (readdirSync(APP, { recursive: true }) as string[])
  .map((f) => toPosix(relative(ROOT, join(APP, f))))
  .filter((f) => /\.(ts|tsx|js|jsx|mjs)$/.test(f))
  .sort();

export const USE_SERVER = /^\s*["']use server["'];?\s*$/;
const lines = (f: string) => readFileSync(join(ROOT, f), "utf8").split(/\r?\n/);

/** Files whose first line is "use server": every export is a server action. */
export const actionFiles = sourceFiles.filter((f) => USE_SERVER.test(lines(f)[0] ?? ""));
/** Files with a "use server" line further down (an inline action the walk would not see). */
export const inlineServerFiles = sourceFiles.filter((f) => lines(f).slice(1).some((l) => USE_SERVER.test(l)));
export const routeFiles = sourceFiles.filter((f) => /(^|\/)route\.(ts|tsx|js|mjs)$/.test(f));
export const pageFiles = sourceFiles.filter((f) => /(^|\/)page\.(tsx|ts|jsx|js|mdx)$/.test(f));

/**
 * The URL path of a page or route file, keeping its parameters' folder names:
 * "app/(workshop)/register/items/[identity]/page.tsx" → "/register/items/[identity]".
 * Route groups "(…)" and slots "@…" are not part of the URL.
 */
export function urlPathOf(file: string): string {
  const segments = file
    .replace(/^app\//, "")
    .split("/")
    .slice(0, -1)
    .filter((s) => !/^\(.*\)$/.test(s) && !s.startsWith("@"));
  return `/${segments.join("/")}`;
}

/** The names of a path's parameters, in order: "/a/[x]/b/[y]" → ["x", "y"]; catch-alls marked. */
export function paramsOf(path: string): { name: string; catchAll: boolean }[] {
  return [...path.matchAll(/\[{1,2}(\.\.\.)?([^\]]+)\]{1,2}/g)].map((m) => ({ name: m[2]!, catchAll: Boolean(m[1]) }));
}

/** The path with each parameter filled in from `values` (URL-encoded). */
export function fillPath(path: string, values: Record<string, string>): string {
  return path.replace(/\[{1,2}(?:\.\.\.)?([^\]]+)\]{1,2}/g, (_m, name: string) => {
    const v = values[name];
    if (v === undefined) throw new Error(`no value for [${name}] in ${path}`);
    return encodeURIComponent(v);
  });
}
