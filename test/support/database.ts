/**
 * A fresh database for one test run: on DATABASE_URL's server when it is set, otherwise on an
 * embedded PostgreSQL in a temporary data folder. Migrations are applied; dropped afterwards.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { attachEmbeddedDatabase } from "../../lib/server/db/embedded.ts";
import { applyMigrations } from "../../lib/server/db/migrate.ts";

export type TestDatabase = { url: string; baseUrl: string; embedded: boolean; drop: () => Promise<void> };

function withDatabase(url: string, name: string): string {
  const u = new URL(url);
  u.pathname = "/" + name;
  return u.toString();
}

export async function createTestDatabase(label: string): Promise<TestDatabase> {
  let baseUrl = process.env.DATABASE_URL;
  let detach: (() => Promise<void>) | null = null;
  let dataDir: string | null = null;
  if (!baseUrl) {
    dataDir = mkdtempSync(join(tmpdir(), "epochal-test-pg-"));
    const h = await attachEmbeddedDatabase({ dataDir, log: () => undefined });
    baseUrl = h.url;
    detach = h.detach;
  }
  const name = `epochal_${label}_${Date.now().toString(36)}_${process.pid}`;
  const admin = new pg.Client({ connectionString: withDatabase(baseUrl, "postgres") });
  await admin.connect();
  await admin.query(`create database "${name}"`);
  await admin.end();
  const url = withDatabase(baseUrl, name);
  await applyMigrations(url);
  return {
    url,
    baseUrl,
    embedded: detach !== null,
    drop: async () => {
      const a = new pg.Client({ connectionString: withDatabase(baseUrl!, "postgres") });
      await a.connect();
      await a.query(`drop database if exists "${name}" with (force)`);
      await a.end();
      if (detach) await detach();
      if (dataDir) rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
