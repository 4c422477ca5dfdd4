import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { onEpochsCommitted, type EpochsCommitted } from "../../../lib/server/pipeline.ts";
import { GRID, epochCsv, makeSite, post } from "./helpers.ts";

describe("afterEpochsCommitted hook", () => {
  it("listeners get the site and the stored epoch ids after commit, nothing for unchanged or refused posts", async () => {
    const s = await makeSite();
    const seen: (EpochsCommitted & { visible: number })[] = [];
    const off = onEpochsCommitted(async (e) => {
      if (e.siteId !== s.id) return;
      // Committed: another connection (the shared client, outside the transaction) sees the rows.
      seen.push({ siteId: e.siteId, epochIds: e.epochIds, visible: await getDb().epoch.count({ where: { id: { in: e.epochIds } } }) });
    });
    const failing = onEpochsCommitted(() => {
      throw new Error("a broken listener must not undo the ingest");
    });
    try {
      const a = await post(s.slug, epochCsv("2024-06-01T00:00:00Z", GRID), { token: s.ingestToken });
      expect(a.status).toBe(201);
      await post(s.slug, epochCsv("2024-06-01T00:00:00Z", GRID), { token: s.ingestToken }); // unchanged
      await post(s.slug, epochCsv("2024-06-01T00:00:00Z", GRID, 0.01), { token: s.ingestToken }); // 409
      const id = (a.json.epochs as { id: number }[])[0].id;
      expect(seen).toEqual([{ siteId: s.id, epochIds: [id], visible: 1 }]);
    } finally {
      off();
      failing();
    }
  });
});
