/**
 * Every citation of the project's list of sources names the one file, docs/REFERENCES.md, and a
 * section that is really there: "docs/REFERENCES.md, § GS1". A renamed section or a path spelt
 * another way fails here instead of leaving a reader with nowhere to look.
 */
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative, resolve } from "node:path";
import { describe, expect, test } from "vitest";

const root = resolve(__dirname, "../..");
const REFERENCES = "docs/REFERENCES.md";

function walk(dir: string, out: string[] = []): string[] {
  for (const name of readdirSync(dir)) {
    if (name === "node_modules" || name.startsWith(".")) continue;
    const p = join(dir, name);
    if (statSync(p).isDirectory()) walk(p, out);
    else if (/\.(ts|tsx|mjs|md)$/.test(name)) out.push(p);
  }
  return out;
}

const sections = readFileSync(join(root, REFERENCES), "utf8")
  .split("\n")
  .filter((l) => l.startsWith("## "))
  .map((l) => l.slice(3).trim());

/** The problems with each mention of REFERENCES.md in a text. */
function citationProblems(text: string, known: string[]): string[] {
  const problems: string[] = [];
  for (const m of text.matchAll(/(\S*)REFERENCES\.md(.{0,60})/g)) {
    const [, before, after] = m as unknown as [string, string, string];
    if (!/(^|[\s(`"'])docs\/$/.test(before) && before !== "docs/") {
      problems.push(`cites "${before}REFERENCES.md" instead of ${REFERENCES}`);
      continue;
    }
    const section = /^,? § (.+)/.exec(after)?.[1];
    if (section === undefined) problems.push(`cites ${REFERENCES} without a section ("${REFERENCES}, § name")`);
    else if (!known.some((s) => section.startsWith(s))) problems.push(`cites a section that ${REFERENCES} does not have: § ${section}`);
  }
  return problems;
}

describe("citations of docs/REFERENCES.md", () => {
  test.each([
    ["docs/REFERENCES.md, § GS1", []],
    ["(docs/REFERENCES.md, § Loudspeaker parameters)", []],
    ["see ../shared/REFERENCES.md, section GS1", ['cites "../shared/REFERENCES.md" instead of docs/REFERENCES.md']],
    ["a value (REFERENCES.md)", ['cites "(REFERENCES.md" instead of docs/REFERENCES.md']],
    ["docs/REFERENCES.md says so", ['cites docs/REFERENCES.md without a section ("docs/REFERENCES.md, § name")']],
    ["docs/REFERENCES.md, § Fractional bands", ["cites a section that docs/REFERENCES.md does not have: § Fractional bands"]],
  ])("the check itself: %s", (text, expected) => {
    // The sections named here are the file's own (GS1, Loudspeaker parameters).
    expect(citationProblems(text, sections)).toEqual(expected);
  });

  test("every file under tests, lib, app, components, db, bench and scripts cites only docs/REFERENCES.md, § a section it has", () => {
    const files = ["tests", "lib", "app", "components", "db", "bench", "scripts"].flatMap((d) => walk(join(root, d))).filter((f) => !f.endsWith("references.test.ts"));
    expect(files.length).toBeGreaterThan(100);
    const problems = files.flatMap((f) => citationProblems(readFileSync(f, "utf8"), sections).map((p) => `${relative(root, f)}: ${p}`));
    expect(problems).toEqual([]);
  });
});
