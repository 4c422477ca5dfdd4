import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { ingestEpochs, type IngestStage } from "../../../lib/server/ingest/service.ts";
import { parseEpochCsvInput } from "../../../lib/server/ingest/csv-input.ts";
import { GRID, counts, epochCsv, makeSite, post } from "./helpers.ts";

const T1 = "2024-04-01T00:00:00Z";
const T2 = "2024-04-01T00:15:00Z";

function epochsOf(text: string) {
  const r = parseEpochCsvInput(text);
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return r.epochs;
}

describe("ingestEpochs atomicity", () => {
  for (const stage of ["after-points", "after-observations", "after-results"] as IngestStage[]) {
    it(`ingestEpochs failing ${stage} leaves no epoch, observation, point, audit row or result behind`, async () => {
      const s = await makeSite();
      const db = getDb();
      // One stored epoch and an element, so the failing request has results to compute too.
      await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
      await db.element.create({ data: { siteId: s.id, name: "T", kind: "triangle", mode: "plan", pointCodes: ["P1", "P2", "P3"] } });
      const before = await counts(s.id);
      const text = epochCsv(T2, [...GRID, ["NEW1", 1, 2, 3]]) + epochCsv("2024-04-01T00:30:00Z", GRID).split("\n").slice(1).join("\n");
      let reached = false;
      await expect(
        ingestEpochs(epochsOf(text), {
          siteId: s.id,
          actor: "test",
          failpoint: (st) => {
            if (st === stage) {
              reached = true;
              throw new Error(`injected failure ${stage}`);
            }
          },
        }),
      ).rejects.toThrow(`injected failure ${stage}`);
      expect(reached).toBe(true);
      expect(await counts(s.id)).toEqual(before);
      expect(await db.point.findFirst({ where: { siteId: s.id, code: "NEW1" } })).toBe(null);
    });
  }

  it("a database constraint failing on the last observation row rolls back the whole backfill", async () => {
    const s = await makeSite();
    const db = getDb();
    // A test-only CHECK that refuses one magic coordinate (no other test uses it); dropped afterwards.
    const magic = 987654.321012;
    const name = `test_fail_late_${s.id}`;
    await db.$executeRawUnsafe(`ALTER TABLE "Observation" ADD CONSTRAINT "${name}" CHECK (east <> ${magic}) NOT VALID`);
    try {
      const rows: [string, number, number, number][] = [...GRID.slice(0, 3), ["P4", magic, 2008.66, 99.8]];
      const epochs = epochsOf(epochCsv(T1, GRID) + epochCsv(T2, rows).split("\n").slice(1).join("\n"));
      await expect(ingestEpochs(epochs, { siteId: s.id, actor: "test" })).rejects.toThrow(new RegExp(name));
    } finally {
      await db.$executeRawUnsafe(`ALTER TABLE "Observation" DROP CONSTRAINT "${name}"`);
    }
    expect(await counts(s.id)).toEqual({ epochs: 0, observations: 0, points: 0, audits: 0, results: 0 });
  });
});
