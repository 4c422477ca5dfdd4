/** A private PostgreSQL cluster with one migrated database and a `next start` on it (the database-restart tests). */
import { afterAll, beforeAll } from "vitest";
import type pg from "pg";
import { applyMigrations } from "../../../lib/server/db/migrate.ts";
import { openPool } from "./fixtures.ts";
import { PrivateCluster, privateClusterUnavailable } from "./pg-cluster.ts";
import { TestServer } from "./server.ts";

export type ClusterHarness = { cluster: PrivateCluster; pool: pg.Pool; server: TestServer };

export const clusterSkipReason = privateClusterUnavailable();

export function useClusterServer(): ClusterHarness {
  const h = {} as ClusterHarness;
  beforeAll(async () => {
    if (clusterSkipReason) return;
    h.cluster = await PrivateCluster.create();
    const url = await h.cluster.createDatabase("epochal_reliability");
    await applyMigrations(url);
    h.pool = openPool(url);
    h.server = await TestServer.start({ databaseUrl: url });
    await h.server.waitHealthy();
  });
  afterAll(async () => {
    await h.server?.stop();
    await h.pool?.end().catch(() => undefined);
    h.cluster?.destroy();
  });
  return h;
}
