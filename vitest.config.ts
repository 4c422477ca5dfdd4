import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL(".", import.meta.url));

// Four projects: pure unit tests (no I/O), database tests against a real PostgreSQL
// (DATABASE_URL, or the embedded default), browser tests against a production build, and
// quick reliability checks (faults, hostile input, access over HTTP) against the same build.
export default defineConfig({
  resolve: { alias: { "@": root, "server-only": fileURLToPath(new URL("./test/support/server-only-stub.ts", import.meta.url)) } },
  test: {
    projects: [
      { extends: true, test: { name: "unit", include: ["test/unit/**/*.test.ts"], environment: "node", sequence: { groupOrder: 0 } } },
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
          sequence: { groupOrder: 0 },
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
          // Browser tests run after the unit and database tests, and before the fault tests, so
          // timings and CPU are not shared with them.
          sequence: { groupOrder: 1 },
        },
      },
      {
        extends: true,
        test: {
          // The quick fault and hostile-input checks; the long ones run with `npm run reliability`.
          name: "reliability",
          include: ["test/reliability/**/*.quick.test.ts"],
          environment: "node",
          globalSetup: ["test/reliability/support/global-setup.ts"],
          testTimeout: 300_000,
          hookTimeout: 600_000,
          fileParallelism: false,
          sequence: { groupOrder: 2 },
        },
      },
    ],
  },
});
