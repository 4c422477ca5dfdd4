/**
 * ElementResult carries no foreign keys (prisma/schema.prisma says why): its integrity rests on the
 * results engine writing rows only for elements and epochs it has just read in the same transaction.
 * This checks that invariant on a site that goes through the paths that write results — new epochs,
 * a backfill, a revision, an element added later, a re-baselined element — and a rolled-back request.
 * Observation has no foreign keys either (migration observation_without_foreign_keys): the same
 * flows must leave every observation on an existing epoch and point of one site, and the triggers
 * that replace ON DELETE RESTRICT must refuse deleting an epoch or a point that has observations.
 */
import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { GRID, epochCsv, makeSite, post } from "./helpers.ts";

type Broken = { orphanElement: number; orphanEpoch: number; otherSite: number; wrongTime: number; rows: number };

/** Result rows of the site's elements or epochs that break an invariant a foreign key would have kept. */
async function brokenRows(siteId: number): Promise<Broken> {
  const [r] = await getDb().$queryRawUnsafe<Broken[]>(
    `WITH mine AS (
       SELECT r.* FROM "ElementResult" r WHERE r."elementId" IN (SELECT id FROM "Element" WHERE "siteId" = $1)
       UNION
       SELECT r.* FROM "ElementResult" r WHERE r."epochId" IN (SELECT id FROM "Epoch" WHERE "siteId" = $1))
     SELECT count(*) FILTER (WHERE el.id IS NULL)::int AS "orphanElement",
            count(*) FILTER (WHERE ep.id IS NULL OR rf.id IS NULL)::int AS "orphanEpoch",
            count(*) FILTER (WHERE el."siteId" <> ep."siteId" OR ep."siteId" <> rf."siteId")::int AS "otherSite",
            count(*) FILTER (WHERE ep."time" <> m."time")::int AS "wrongTime",
            count(*)::int AS rows
       FROM mine m
       LEFT JOIN "Element" el ON el.id = m."elementId"
       LEFT JOIN "Epoch" ep ON ep.id = m."epochId"
       LEFT JOIN "Epoch" rf ON rf.id = m."referenceEpochId"`,
    siteId,
  );
  return r;
}

type BrokenObs = { orphanEpoch: number; orphanPoint: number; otherSite: number; rows: number };

/** Observations of the site's epochs or points without their epoch or point, or across two sites. */
async function brokenObservations(siteId: number): Promise<BrokenObs> {
  const [r] = await getDb().$queryRawUnsafe<BrokenObs[]>(
    `WITH mine AS (
       SELECT o.* FROM "Observation" o WHERE o."epochId" IN (SELECT id FROM "Epoch" WHERE "siteId" = $1)
       UNION
       SELECT o.* FROM "Observation" o WHERE o."pointId" IN (SELECT id FROM "Point" WHERE "siteId" = $1))
     SELECT count(*) FILTER (WHERE ep.id IS NULL)::int AS "orphanEpoch",
            count(*) FILTER (WHERE pt.id IS NULL)::int AS "orphanPoint",
            count(*) FILTER (WHERE ep."siteId" <> pt."siteId")::int AS "otherSite",
            count(*)::int AS rows
       FROM mine m
       LEFT JOIN "Epoch" ep ON ep.id = m."epochId"
       LEFT JOIN "Point" pt ON pt.id = m."pointId"`,
    siteId,
  );
  return r;
}

describe("element results without foreign keys", () => {
  it("every stored result names an existing element and epoch of its own site, at that epoch's time", async () => {
    const s = await makeSite();
    const db = getDb();
    await db.element.create({ data: { siteId: s.id, name: "T1", kind: "triangle", mode: "plan", pointCodes: ["P1", "P2", "P3"] } });
    expect((await post(s.slug, epochCsv("2024-05-01T00:00:00Z", GRID), { token: s.ingestToken })).status).toBe(201);
    // A backfill of three epochs in one request.
    const backfill = ["2024-05-01T00:15:00Z", "2024-05-01T00:30:00Z", "2024-05-01T00:45:00Z"].map((t, i) => epochCsv(t, GRID, 0.001 * (i + 1)).split("\n").slice(i === 0 ? 0 : 1).join("\n")).join("");
    expect((await post(s.slug, backfill, { token: s.ingestToken })).status).toBe(201);
    // A revision of one epoch: new epoch id, same time, results against it too.
    expect((await post(s.slug, epochCsv("2024-05-01T00:30:00Z", GRID, 0.004), { token: s.ingestToken, query: "?revise=true" })).status).toBe(201);
    // An element added later, and one with its own reference epoch, then one more epoch.
    const ref = await db.epoch.findFirstOrThrow({ where: { siteId: s.id, isCurrent: true }, orderBy: { time: "desc" } });
    await db.element.create({ data: { siteId: s.id, name: "T2", kind: "triangle", mode: "plan", pointCodes: ["P2", "P3", "P4"], referenceEpochId: ref.id } });
    await db.element.create({ data: { siteId: s.id, name: "B1", kind: "baseline", mode: "slope", pointCodes: ["P1", "P4"] } });
    expect((await post(s.slug, epochCsv("2024-05-01T01:00:00Z", GRID, 0.005), { token: s.ingestToken })).status).toBe(201);
    // A refused request (a bad row) writes nothing at all.
    const bad = epochCsv("2024-05-01T01:15:00Z", GRID) + "P9,abc,1,1,2024-05-01T01:15:00Z\n";
    expect((await post(s.slug, bad, { token: s.ingestToken })).status).toBe(422);

    const b = await brokenRows(s.id);
    // T1 at six epochs (the first, three backfilled, the revision, the last); T2 and B1 at the last
    // (elements made straight in the table get no history).
    expect(b).toEqual({ orphanElement: 0, orphanEpoch: 0, otherSite: 0, wrongTime: 0, rows: 8 });
    // Six epochs (five times, one of them revised) of the grid's points, nothing from the refused request.
    expect(await brokenObservations(s.id)).toEqual({ orphanEpoch: 0, orphanPoint: 0, otherSite: 0, rows: 6 * GRID.length });
  });

  it("an epoch or a point with observations cannot be deleted; one without can", async () => {
    const s = await makeSite();
    const db = getDb();
    expect((await post(s.slug, epochCsv("2024-06-01T00:00:00Z", GRID), { token: s.ingestToken })).status).toBe(201);
    const epoch = await db.epoch.findFirstOrThrow({ where: { siteId: s.id } });
    const point = await db.point.findFirstOrThrow({ where: { siteId: s.id, code: GRID[0][0] } });
    await expect(db.epoch.delete({ where: { id: epoch.id } })).rejects.toThrow(/never deleted/);
    await expect(db.point.delete({ where: { id: point.id } })).rejects.toThrow(/never deleted/);
    expect(await brokenObservations(s.id)).toEqual({ orphanEpoch: 0, orphanPoint: 0, otherSite: 0, rows: GRID.length });
    const unused = await db.point.create({ data: { siteId: s.id, code: "UNUSED" } });
    await db.point.delete({ where: { id: unused.id } });
    expect(await db.point.count({ where: { id: unused.id } })).toBe(0);
  });
});
