import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { vi } from "vitest";
import { migrateDatabase } from "@/db/migrate";

// Runs before each integration test file, in that file's own module context.

// Outside a Next server there is no request: every file gets the same stand-ins
// (tests/setup/next-request.ts), and a test signs in by setting `request.sessionId` there.
vi.mock("next/headers", async () => (await import("../setup/next-request")).nextHeaders);
vi.mock("next/navigation", async () => (await import("../setup/next-request")).nextNavigation);
vi.mock("next/cache", async () => (await import("../setup/next-request")).nextCache);

const dir = mkdtempSync(join(tmpdir(), "twinleaf-it-"));
process.env.DATABASE_URL = `file:${join(dir, "test.db")}`;
process.env.TWINLEAF_TEST_DIR = dir;
await migrateDatabase(process.env.DATABASE_URL);
