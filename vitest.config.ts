import { fileURLToPath } from "node:url";
import { defineConfig } from "vitest/config";

const root = fileURLToPath(new URL(".", import.meta.url));
const alias = { "@": root, "server-only": `${root}tests/support/server-only.ts` };
/** What next.config.ts sets for the app: the plotting library's address (never fetched by tests). */
const env = { BANDCROSS_PLOTLY_SRC: "/vendor/plotly-test.min.js" };

/**
 * Three depths of tests (see DEVELOPERS.md):
 * - unit: pure computation and small modules, no services;
 * - integration: services against the real PostgreSQL, storage fake and mail fake started by scripts/test.sh;
 * - e2e: the built app in Debian's chromium through playwright-core.
 */
export default defineConfig({
  resolve: { alias },
  test: {
    projects: [
      {
        resolve: { alias },
        test: { name: "unit", include: ["tests/unit/**/*.test.ts"], environment: "node", env },
      },
      {
        resolve: { alias },
        test: {
          name: "integration",
          env,
          include: ["tests/integration/**/*.test.ts"],
          environment: "node",
          testTimeout: 30_000,
          hookTimeout: 60_000,
          fileParallelism: false,
        },
      },
      {
        resolve: { alias },
        test: {
          name: "e2e",
          env,
          include: ["tests/e2e/**/*.test.ts"],
          environment: "node",
          testTimeout: 60_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
