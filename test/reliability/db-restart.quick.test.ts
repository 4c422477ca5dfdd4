/** Database restart (CI): PostgreSQL (a private cluster) stopped for 5 s during ingest with the dashboard open. */
import { describe, expect, it } from "vitest";
import { clusterSkipReason, useClusterServer } from "./support/cluster-harness.ts";
import { runDbRestart } from "./support/db-restart.ts";
import { printFigures } from "./support/fixtures.ts";

if (clusterSkipReason) console.warn(`[reliability] database-restart test SKIPPED: ${clusterSkipReason}`);
const h = useClusterServer();

describe.skipIf(clusterSkipReason !== null)("database restart (quick)", () => {
  it("PostgreSQL down 5 s: health 503 and ingest 503 `unavailable` meanwhile, recovery without a server restart, nothing acknowledged lost", async () => {
    const { figures, problems, outageBodies } = await runDbRestart({ server: h.server, pool: h.pool, cluster: h.cluster, outageS: 5 });
    printFigures("database restart, 5 s outage", { ...figures, outageAnswers: outageBodies });
    expect(problems).toEqual([]);
    expect(figures.lost + figures.duplicated).toBe(0);
  });
});
