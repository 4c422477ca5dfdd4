/**
 * The ingest service keeps a site's point ids and element definitions in memory and checks them
 * against Site.pointsStamp / Site.elementsStamp, which database triggers change on any write by any
 * writer (migration site_cache_stamps). These changes are made with plain SQL, as another process or
 * an administrator at psql would, between two posts: the second post must see them. It also takes the
 * site's reference before storing (to compute results while the observations are stored): the
 * reference must be what it is once the epochs are stored, including when a backfill brings an epoch
 * earlier than the site's first.
 */
import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { GRID, makeSite, post } from "./helpers.ts";

type Pt = [string, number, number, number];

function csv(time: string, points: Pt[], moves: Record<string, number> = {}): string {
  return ["point,east,north,height,time", ...points.map(([p, e, n, h]) => `${p},${e + (moves[p] ?? 0)},${n},${h},${time}`)].join("\n") + "\n";
}

/** Slope distance between two GRID points, with east moves applied. */
function slope(a: string, b: string, moves: Record<string, number> = {}): number {
  const A = GRID.find((p) => p[0] === a) as Pt, B = GRID.find((p) => p[0] === b) as Pt;
  return Math.hypot(B[1] + (moves[b] ?? 0) - A[1] - (moves[a] ?? 0), B[2] - A[2], B[3] - A[3]);
}

async function epochId(res: { json: Record<string, unknown> }): Promise<number> {
  return (res.json.epochs as { id: number }[])[0].id;
}

describe("site caches and the reference taken before storing", () => {
  it("a point renamed with plain SQL between two posts: the code is registered anew and its observations go to the new point", async () => {
    const s = await makeSite();
    const db = getDb();
    expect((await post(s.slug, csv("2026-03-01T00:00:00Z", GRID), { token: s.ingestToken })).status).toBe(201);
    await db.$executeRawUnsafe(`UPDATE "Point" SET code = 'P4-old' WHERE "siteId" = $1 AND code = 'P4'`, s.id);
    const r = await post(s.slug, csv("2026-03-01T01:00:00Z", GRID, { P4: 0.25 }), { token: s.ingestToken });
    expect(r.status).toBe(201);
    expect(r.json.newPoints).toEqual(["P4"]);
    const rows = await db.$queryRawUnsafe<{ code: string; east: number }[]>(
      `SELECT p.code, o.east FROM "Observation" o JOIN "Point" p ON p.id = o."pointId" WHERE o."epochId" = $1 ORDER BY p.code`,
      await epochId(r),
    );
    expect(rows.map((x) => x.code)).toEqual(["P1", "P2", "P3", "P4"]);
    expect(rows[3].east).toBe(1015.25);
    const old = await db.$queryRawUnsafe<{ n: number }[]>(`SELECT count(*)::int AS n FROM "Observation" o JOIN "Point" p ON p.id = o."pointId" WHERE p."siteId" = $1 AND p.code = 'P4-old'`, s.id);
    expect(old[0].n).toBe(1);
  });

  it("an element whose points are changed with plain SQL between two posts is computed with its new points", async () => {
    const s = await makeSite();
    const db = getDb();
    await post(s.slug, csv("2026-03-02T00:00:00Z", GRID), { token: s.ingestToken });
    const el = await db.element.create({ data: { siteId: s.id, name: "B", kind: "baseline", mode: "slope", pointCodes: ["P1", "P2"] } });
    const m1 = { P2: 0.01 };
    const e1 = await epochId(await post(s.slug, csv("2026-03-02T01:00:00Z", GRID, m1), { token: s.ingestToken }));
    await db.$executeRawUnsafe(`UPDATE "Element" SET "pointCodes" = ARRAY['P3', 'P4'] WHERE id = $1`, el.id);
    const m2 = { P4: 0.03 };
    const e2 = await epochId(await post(s.slug, csv("2026-03-02T02:00:00Z", GRID, m2), { token: s.ingestToken }));
    const rows = await db.elementResult.findMany({ where: { elementId: el.id }, orderBy: { time: "asc" } });
    const at = (id: number) => rows.find((r) => r.epochId === id)?.engineering;
    // Engineering strain of a baseline: (L − L0) / L0 of slope distances (analytic).
    expect(at(e1)).toBeCloseTo((slope("P1", "P2", m1) - slope("P1", "P2")) / slope("P1", "P2"), 12);
    expect(at(e2)).toBeCloseTo((slope("P3", "P4", m2) - slope("P3", "P4")) / slope("P3", "P4"), 12);
    // A disabled element (plain SQL again) gets no row at the next epoch.
    await db.$executeRawUnsafe(`UPDATE "Element" SET "disabledAt" = now() WHERE id = $1`, el.id);
    const e3 = await epochId(await post(s.slug, csv("2026-03-02T03:00:00Z", GRID, m2), { token: s.ingestToken }));
    expect(await db.elementResult.count({ where: { elementId: el.id, epochId: e3 } })).toBe(0);
  });

  it("without a set reference the first current epoch is the reference, also when a backfill brings an earlier one", async () => {
    const s = await makeSite();
    const db = getDb();
    const t2 = await epochId(await post(s.slug, csv("2026-03-03T02:00:00Z", GRID), { token: s.ingestToken }));
    const el = await db.element.create({ data: { siteId: s.id, name: "B", kind: "baseline", mode: "slope", pointCodes: ["P1", "P2"] } });
    const t3 = await epochId(await post(s.slug, csv("2026-03-03T03:00:00Z", GRID, { P2: 0.01 }), { token: s.ingestToken }));
    // Earlier than the first epoch: it becomes the site's first current epoch, and its own reference.
    const t1 = await epochId(await post(s.slug, csv("2026-03-03T01:00:00Z", GRID, { P2: -0.01 }), { token: s.ingestToken }));
    const t4 = await epochId(await post(s.slug, csv("2026-03-03T04:00:00Z", GRID, { P2: 0.02 }), { token: s.ingestToken }));
    // A revision of the first epoch: the new revision is the first current epoch from then on.
    const r1 = await post(s.slug, csv("2026-03-03T01:00:00Z", GRID, { P2: -0.02 }), { token: s.ingestToken, query: "?revise=true" });
    expect(r1.status).toBe(201);
    const t1b = await epochId(r1);
    const t5 = await epochId(await post(s.slug, csv("2026-03-03T05:00:00Z", GRID), { token: s.ingestToken }));
    const rows = await db.elementResult.findMany({ where: { elementId: el.id } });
    const refOf = (id: number) => rows.filter((r) => r.epochId === id).map((r) => r.referenceEpochId);
    expect(refOf(t3)).toEqual([t2]);
    expect(refOf(t1)).toEqual([t1]);
    expect(refOf(t4)).toEqual([t1]);
    expect(refOf(t1b)).toEqual([t1b]);
    expect(refOf(t5)).toEqual([t1b]);
    const l0 = slope("P1", "P2", { P2: -0.02 });
    expect(rows.find((r) => r.epochId === t5)?.engineering).toBeCloseTo((slope("P1", "P2") - l0) / l0, 12);
  });
});
