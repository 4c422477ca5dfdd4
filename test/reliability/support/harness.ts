/** One test file's database and server: a fresh migrated database and a `next start` on it. */
import { afterAll, beforeAll } from "vitest";
import type pg from "pg";
import { createTestDatabase, type TestDatabase } from "../../support/database.ts";
import { openPool } from "./fixtures.ts";
import { TestServer, type ServerOptions } from "./server.ts";

export type Harness = { db: TestDatabase; pool: pg.Pool; server: TestServer };

/** Registers beforeAll/afterAll that create the database and start the server; the returned object is filled in beforeAll. */
export function useServer(label: string, opts: Omit<ServerOptions, "databaseUrl"> = {}): Harness {
  const h = {} as Harness;
  beforeAll(async () => {
    h.db = await createTestDatabase(`rel_${label}`);
    h.pool = openPool(h.db.url);
    h.server = await TestServer.start({ ...opts, databaseUrl: h.db.url });
    await h.server.waitHealthy();
  });
  afterAll(async () => {
    await h.server?.stop();
    await h.pool?.end();
    await h.db?.drop();
  });
  return h;
}
