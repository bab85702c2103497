import "server-only";
import { readFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { sql } from "drizzle-orm";
import type { DbOrTx } from "@/db";
import { appendOnlyTables, requiredTriggers, tableWords, triggerPurpose } from "./protected";

export interface TriggerDefinition {
  name: string;
  table: string;
  /** The CREATE TRIGGER statement with its whitespace collapsed, as SQLite keeps it. */
  sql: string;
}

export interface TriggerProblem {
  kind: "missing" | "altered" | "unexpected";
  name: string;
  table: string;
  /** Plain words, without the trigger's technical name. */
  message: string;
}

export const normalizeSql = (s: string) => s.replace(/\s+/g, " ").trim().replace(/;$/, "").trim();

const NAME = "[`\"\\[]?([A-Za-z0-9_]+)[`\"\\]]?";
const CREATE = new RegExp(`^CREATE\\s+TRIGGER\\s+(IF\\s+NOT\\s+EXISTS\\s+)?${NAME}\\s[\\s\\S]*?\\bON\\s+${NAME}`, "i");
const DROP_TRIGGER = new RegExp(`^DROP\\s+TRIGGER\\s+(?:IF\\s+EXISTS\\s+)?${NAME}`, "i");
const DROP_TABLE = new RegExp(`^DROP\\s+TABLE\\s+(?:IF\\s+EXISTS\\s+)?${NAME}`, "i");

/** A statement without the comment lines before it. */
const statementText = (chunk: string) => chunk.replace(/^(\s*--[^\n]*\n)+/g, "").trim();

/**
 * The triggers the committed migrations leave behind, replayed in the journal's order: a trigger
 * is created, dropped again, or goes with its table. The migrations are the one description of
 * what the database should hold, so a trigger added later is checked without anyone listing it.
 */
export function triggersFromMigrations(folder: string): Map<string, TriggerDefinition> {
  const journal = JSON.parse(readFileSync(join(folder, "meta", "_journal.json"), "utf8")) as { entries: { tag: string }[] };
  const out = new Map<string, TriggerDefinition>();
  for (const { tag } of journal.entries) {
    for (const chunk of readFileSync(join(folder, `${tag}.sql`), "utf8").split("--> statement-breakpoint")) {
      const text = statementText(chunk);
      const created = CREATE.exec(text);
      if (created) {
        const [, ifNotExists, name, table] = created;
        if (ifNotExists && out.has(name!)) continue;
        // SQLite keeps the statement as written, less an IF NOT EXISTS.
        out.set(name!, { name: name!, table: table!, sql: normalizeSql(text.replace(/\s+IF\s+NOT\s+EXISTS\s+/i, " ")) });
        continue;
      }
      const dropped = DROP_TRIGGER.exec(text);
      if (dropped) {
        out.delete(dropped[1]!);
        continue;
      }
      const droppedTable = DROP_TABLE.exec(text);
      if (droppedTable) for (const [name, t] of out) if (t.table === droppedTable[1]) out.delete(name);
    }
  }
  return out;
}

export const MIGRATIONS_DIR = () => resolve(/*turbopackIgnore: true*/ process.cwd(), "db", "migrations");

let cached: { folder: string; triggers: Map<string, TriggerDefinition> } | null = null;
function expectedTriggers(folder: string): Map<string, TriggerDefinition> {
  if (cached?.folder !== folder) cached = { folder, triggers: triggersFromMigrations(folder) };
  return cached.triggers;
}

const capital = (s: string) => s.charAt(0).toUpperCase() + s.slice(1);

/**
 * Every protective trigger the migrations define is present and unchanged, every append-only table
 * still has its no-delete and no-replace triggers, and no trigger has been added behind their back.
 */
export async function triggerProblems(db: DbOrTx, folder = MIGRATIONS_DIR()): Promise<TriggerProblem[]> {
  const expected = expectedTriggers(folder);
  const present = new Map(
    (await db.all<{ name: string; table: string; sql: string }>(sql`SELECT name, tbl_name AS "table", sql FROM sqlite_master WHERE type = 'trigger'`)).map((t) => [t.name, t]),
  );
  const wanted = new Map<string, string>([...expected.values()].map((t) => [t.name, t.table]));
  for (const table of appendOnlyTables) for (const name of requiredTriggers(table)) if (!wanted.has(name)) wanted.set(name, table);

  const problems: TriggerProblem[] = [];
  for (const [name, table] of [...wanted].sort(([a], [b]) => a.localeCompare(b))) {
    const found = present.get(name);
    const rule = `${capital(tableWords(table))}: the rule that ${triggerPurpose(name)}`;
    if (!found) problems.push({ kind: "missing", name, table, message: `${rule} is missing.` });
    else if (expected.has(name) && normalizeSql(found.sql) !== expected.get(name)!.sql) problems.push({ kind: "altered", name, table, message: `${rule} has been changed.` });
    else if (found.table !== table) problems.push({ kind: "altered", name, table, message: `${rule} now guards another table.` });
  }
  for (const [name, t] of present) {
    if (!wanted.has(name)) problems.push({ kind: "unexpected", name, table: t.table, message: `A rule no migration made has been added to ${tableWords(t.table)}.` });
  }
  return problems;
}
