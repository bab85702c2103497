import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

// End-to-end: one production build served on a free port, driven by Debian's Chromium.
export default defineConfig({
  resolve: {
    alias: {
      "@/": fileURLToPath(new URL(".", import.meta.url)),
      "server-only": fileURLToPath(new URL("./tests/setup/server-only.ts", import.meta.url)),
    },
  },
  test: {
    name: "e2e",
    reporters: ["default", "json"],
    outputFile: { json: ".tmp/test-results/e2e.json" },
    include: ["tests/e2e/**/*.e2e.test.ts"],
    globalSetup: ["tests/e2e/global-setup.ts"],
    fileParallelism: false,
    testTimeout: 60_000,
    // A server action's answer reaches the page in well under a second on a quiet machine; on a
    // busy two-core one it can take a few (vitest's default wait for expect.poll is 1 s).
    expect: { poll: { timeout: 10_000 } },
    hookTimeout: 240_000,
  },
});
