/**
 * The layers of ARCHITECTURE.md, checked on the source: app/ translates and never queries the
 * database itself; code that runs in the browser never reaches the database schema or a
 * server-only module; the vocabularies stand alone so both sides can import them.
 */
import { existsSync, readdirSync, readFileSync, statSync } from "node:fs";
import { dirname, join, relative, resolve } from "node:path";
import { describe, expect, test } from "vitest";

const root = resolve(__dirname, "../..");

function walk(dir: string, out: string[] = []): string[] {
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) walk(p, out);
    else if (/\.(ts|tsx)$/.test(name)) out.push(p);
  }
  return out;
}

const IMPORT = /(?:^|\n)\s*(?:import|export)\s+(?:type\s+)?(?:[^"';]*?\s+from\s+)?["']([^"']+)["']/g;

function importsOf(file: string, opts: { values?: boolean } = {}): string[] {
  const text = readFileSync(file, "utf8");
  return [...text.matchAll(IMPORT)].filter((m) => !opts.values || !/^\s*(import|export)\s+type\s/.test(m[0]!)).map((m) => m[1]!);
}

/** The file an import names, for the project's own modules ("@/…" or relative); null for packages. */
function resolveImport(from: string, spec: string): string | null {
  let base: string;
  if (spec.startsWith("@/")) base = join(root, spec.slice(2));
  else if (spec.startsWith(".")) base = resolve(dirname(from), spec);
  else return null;
  for (const candidate of [base, `${base}.ts`, `${base}.tsx`, join(base, "index.ts"), join(base, "index.tsx")]) {
    if (existsSync(candidate) && statSync(candidate).isFile()) return candidate;
  }
  return null;
}

const rel = (p: string) => relative(root, p);
const appFiles = walk(join(root, "app"));

describe("app/ only translates", () => {
  test.each(appFiles.map(rel))("%s imports neither drizzle-orm nor a schema table", (file) => {
    const bad = importsOf(join(root, file)).filter((s) => s === "drizzle-orm" || s.startsWith("drizzle-orm/") || s === "@/db/schema" || s.startsWith("@/db/schema/") || /(^|\/)db\/schema(\/|$)/.test(s));
    expect(bad).toEqual([]);
  });

  test("the check itself catches a file that queries the database", () => {
    const sample = 'import { eq } from "drizzle-orm";\nimport { items } from "@/db/schema";\n';
    const found = [...sample.matchAll(IMPORT)].map((m) => m[1]);
    expect(found).toEqual(["drizzle-orm", "@/db/schema"]);
  });
});

describe("browser code never reaches the database", () => {
  const clientFiles = [...appFiles, ...walk(join(root, "components"))].filter((f) => /^\s*["']use client["']/.test(readFileSync(f, "utf8")));

  /** Every project file a client file pulls in, with the chain that reached it. */
  function reach(start: string): Map<string, string[]> {
    const seen = new Map<string, string[]>([[start, [rel(start)]]]);
    const queue = [start];
    while (queue.length) {
      const file = queue.shift()!;
      // Type-only imports are erased before the browser sees the code.
      for (const spec of importsOf(file, { values: true })) {
        // A server action is called from the client across the network, not bundled into it.
        const target = resolveImport(file, spec);
        if (!target || seen.has(target)) continue;
        if (/^\s*["']use server["']/.test(readFileSync(target, "utf8"))) continue;
        seen.set(target, [...seen.get(file)!, rel(target)]);
        queue.push(target);
      }
    }
    return seen;
  }

  test("there are client components to check", () => {
    expect(clientFiles.length).toBeGreaterThan(10);
  });

  test.each(clientFiles.map(rel))("%s reaches no server-only module and no database code", (file) => {
    const problems: string[] = [];
    for (const [target, chain] of reach(join(root, file))) {
      const text = readFileSync(target, "utf8");
      if (rel(target).startsWith("db/")) problems.push(chain.join(" → "));
      else if (/^import\s+["']server-only["']/m.test(text)) problems.push(`${chain.join(" → ")} (server-only)`);
    }
    expect(problems).toEqual([]);
  });
});

describe("vocabularies stand alone", () => {
  const vocab = walk(join(root, "lib/vocabulary"));
  test.each(vocab.map(rel))("%s imports only other vocabularies", (file) => {
    const outside = importsOf(join(root, file)).filter((s) => !s.startsWith("./") && !s.startsWith("@/lib/vocabulary/"));
    expect(outside).toEqual([]);
  });
});
