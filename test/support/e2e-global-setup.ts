/**
 * Browser and HTTP tests run against a production build (`next build`, then `next start`) on a
 * fresh database with the demo site loaded. Chromium is Debian's (/usr/bin/chromium, or
 * EPOCHAL_CHROMIUM); when it is absent, browser tests skip with a message and HTTP tests still run.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync } from "node:fs";
import { createServer } from "node:net";
import type { TestProject } from "vitest/node";
import { createTestDatabase } from "./database.ts";
import { ensureBuild } from "../../lib/server/cli/serve-core.ts";

declare module "vitest" {
  export interface ProvidedContext {
    baseUrl: string;
    e2eDatabaseUrl: string;
    chromiumPath: string | null;
  }
}

function freePort(): Promise<number> {
  return new Promise((ok) => {
    const s = createServer();
    s.listen(0, "127.0.0.1", () => {
      const a = s.address();
      s.close(() => ok(typeof a === "object" && a ? a.port : 0));
    });
  });
}

export default async function setup(project: TestProject) {
  const chromium = process.env.EPOCHAL_CHROMIUM ?? "/usr/bin/chromium";
  const chromiumPath = existsSync(chromium) ? chromium : null;
  if (!chromiumPath) console.warn(`\n[e2e] Chromium not found at ${chromium}: browser tests are SKIPPED (install it with: apt-get install -y chromium). HTTP tests still run.\n`);
  const db = await createTestDatabase("e2e");
  try {
    const seedModule = "../../seed/demo.ts";
    if (existsSync(new URL(seedModule, import.meta.url))) {
      const mod = (await import(seedModule)) as { seedDemo?: (o: { databaseUrl: string; quiet?: boolean }) => Promise<unknown> };
      if (mod.seedDemo) await mod.seedDemo({ databaseUrl: db.url, quiet: true });
    }
  } catch (err) {
    await db.drop();
    throw err;
  }
  ensureBuild();
  const port = await freePort();
  const server: ChildProcess = spawn(process.execPath, ["node_modules/next/dist/bin/next", "start", "-p", String(port), "-H", "127.0.0.1"], {
    env: { ...process.env, DATABASE_URL: db.url, NEXT_TELEMETRY_DISABLED: "1", EPOCHAL_PUBLIC_URL: `http://127.0.0.1:${port}`, EPOCHAL_TEST_MODE: "1" },
    stdio: ["ignore", "ignore", "inherit"],
  });
  const baseUrl = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 60_000;
  for (;;) {
    try {
      const r = await fetch(`${baseUrl}/api/health`);
      if (r.ok) break;
    } catch {
      /* not up yet */
    }
    if (server.exitCode !== null || Date.now() > deadline) {
      await db.drop();
      throw new Error("e2e: next start did not become healthy");
    }
    await new Promise((r) => setTimeout(r, 200));
  }
  project.provide("baseUrl", baseUrl);
  project.provide("e2eDatabaseUrl", db.url);
  project.provide("chromiumPath", chromiumPath);
  return async () => {
    server.kill("SIGTERM");
    await new Promise((r) => setTimeout(r, 300));
    await db.drop();
  };
}
