/**
 * Reliability tests (issue 11): load, crash, database restart, mail outage, hostile input and the
 * access table, all over HTTP against a production build on 127.0.0.1.
 *   npm run reliability                      the quick and the long ones
 *   npm test                                 the quick ones (*.quick.test.ts), project "reliability"
 * One file at a time: the load and fault tests measure and kill servers, they must not overlap.
 */
import { defineConfig } from "vitest/config";
import { fileURLToPath } from "node:url";

const root = fileURLToPath(new URL("../../", import.meta.url));

export default defineConfig({
  root,
  resolve: { alias: { "@": root, "server-only": fileURLToPath(new URL("../support/server-only-stub.ts", import.meta.url)) } },
  test: {
    name: "reliability",
    include: ["test/reliability/**/*.test.ts"],
    environment: "node",
    globalSetup: ["test/reliability/support/global-setup.ts"],
    testTimeout: 600_000,
    hookTimeout: 600_000,
    fileParallelism: false,
  },
});
