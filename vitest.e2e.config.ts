import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

/**
 * End-to-end: one production build, served by two `next start` processes (two lanes), each with
 * its own database, clock, mailbox and payment stand-in, driven by Debian's Chromium. Files in
 * one lane run one after another (they share that lane's server and clock); the two lanes run
 * side by side. The first lane takes the longest walks, the second everything else, so a new
 * file lands in the second lane unless it is listed here.
 */
const FIRST_LANE = [
  "shell",
  "area-not-found",
  "roles",
  "auth",
  "security-headers",
  "tokens",
  "audit",
  "limits",
].map((name) => `tests/e2e/${name}.e2e.test.ts`);

const ALL = ["tests/e2e/**/*.e2e.test.ts"];

export default defineConfig({
  resolve: {
    alias: {
      "@/": fileURLToPath(new URL(".", import.meta.url)),
      "server-only": fileURLToPath(new URL("./tests/setup/server-only.ts", import.meta.url)),
    },
  },
  test: {
    reporters: ["default", "json"],
    outputFile: { json: ".tmp/test-results/e2e.json" },
    projects: [
      { extends: true, test: { name: "e2e-1", include: FIRST_LANE } },
      { extends: true, test: { name: "e2e-2", include: ALL, exclude: FIRST_LANE } },
    ],
    globalSetup: ["tests/e2e/global-setup.ts"],
    // One file at a time within a lane: its files share one server and one clock.
    fileParallelism: false,
    testTimeout: 60_000,
    // A server action's answer reaches the page in well under a second on a quiet machine; on a
    // busy two-core one it can take a few (vitest's default wait for expect.poll is 1 s).
    expect: { poll: { timeout: 10_000 } },
    hookTimeout: 240_000,
  },
});
