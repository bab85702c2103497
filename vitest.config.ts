import { availableParallelism } from "node:os";
import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

const root = fileURLToPath(new URL(".", import.meta.url));
const alias = {
  "@/": root,
  "server-only": fileURLToPath(new URL("./tests/setup/server-only.ts", import.meta.url)),
};

export default defineConfig({
  resolve: { alias },
  test: {
    // Every core: vitest's default leaves one free, which on a 2-core machine runs the files one
    // at a time (each integration file has its own database, so they run side by side safely).
    maxWorkers: availableParallelism(),
    // The JSON report is what .ci/run counts for its closing line.
    reporters: ["default", "json"],
    outputFile: { json: ".tmp/test-results/unit-integration.json" },
    projects: [
      { resolve: { alias }, test: { name: "unit", include: ["tests/unit/**/*.test.{ts,tsx}"], environment: "node", testTimeout: 20_000 } },
      {
        resolve: { alias },
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          // Each test file gets its own freshly migrated temporary database.
          setupFiles: ["tests/integration/setup.ts"],
          testTimeout: 20_000,
        },
      },
    ],
  },
});
