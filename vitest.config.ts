import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL(".", import.meta.url));

// Three projects: pure unit tests (no I/O), database tests against a real PostgreSQL
// (DATABASE_URL, or the embedded default), and browser tests against a production build.
export default defineConfig({
  resolve: { alias: { "@": root, "server-only": fileURLToPath(new URL("./test/support/server-only-stub.ts", import.meta.url)) } },
  test: {
    projects: [
      { extends: true, test: { name: "unit", include: ["test/unit/**/*.test.ts"], environment: "node" } },
      {
        extends: true,
        test: {
          name: "db",
          include: ["test/db/**/*.test.ts"],
          environment: "node",
          globalSetup: ["test/support/db-global-setup.ts"],
          setupFiles: ["test/support/db-setup.ts"],
          testTimeout: 60_000,
          hookTimeout: 120_000,
        },
      },
      {
        extends: true,
        test: {
          name: "e2e",
          include: ["test/e2e/**/*.test.ts"],
          environment: "node",
          globalSetup: ["test/support/e2e-global-setup.ts"],
          testTimeout: 120_000,
          hookTimeout: 600_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
