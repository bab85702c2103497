import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { migrateDatabase } from "@/db/migrate";

// Runs before each integration test file, in that file's own module context.
const dir = mkdtempSync(join(tmpdir(), "twinleaf-it-"));
process.env.DATABASE_URL = `file:${join(dir, "test.db")}`;
process.env.TWINLEAF_TEST_DIR = dir;
await migrateDatabase(process.env.DATABASE_URL);
