import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { GRID, counts, epochCsv, makeSite, post } from "./helpers.ts";

describe("concurrent POST /api/v1/sites/{slug}/epochs", () => {
  it("eight parallel posts of the same epoch store it once: one 201, seven 200 with the same id", async () => {
    const s = await makeSite();
    const body = epochCsv("2024-05-01T00:00:00Z", GRID);
    const rs = await Promise.all(Array.from({ length: 8 }, () => post(s.slug, body, { token: s.ingestToken })));
    expect(rs.map((r) => r.status).sort()).toEqual([200, 200, 200, 200, 200, 200, 200, 201]);
    const ids = new Set(rs.map((r) => (r.json.epochs as { id: number }[])[0].id));
    expect(ids.size).toBe(1);
    expect(await counts(s.id)).toMatchObject({ epochs: 1, observations: 4, points: 4, audits: 1 });
    // Only one request registered the points.
    expect(rs.filter((r) => (r.json.newPoints as string[]).length > 0)).toHaveLength(1);
  });

  it("parallel posts of different coordinates at one time store one epoch and answer the others 409", async () => {
    const s = await makeSite();
    const rs = await Promise.all(Array.from({ length: 6 }, (_, i) => post(s.slug, epochCsv("2024-05-01T00:00:00Z", GRID, i * 0.001), { token: s.ingestToken })));
    expect(rs.map((r) => r.status).sort()).toEqual([201, 409, 409, 409, 409, 409]);
    expect(await getDb().epoch.count({ where: { siteId: s.id } })).toBe(1);
  });

  it("parallel posts of different epochs (and to two sites) all store, each exactly once", async () => {
    const a = await makeSite();
    const b = await makeSite();
    const times = Array.from({ length: 10 }, (_, i) => new Date(Date.UTC(2024, 4, 1, 0, 15 * i)).toISOString());
    const rs = await Promise.all([
      ...times.map((t, i) => post(a.slug, epochCsv(t, GRID, i * 0.001), { token: a.ingestToken })),
      ...times.map((t, i) => post(b.slug, epochCsv(t, GRID, i * 0.001), { token: b.ingestToken })),
      // Duplicates of the first three, racing the originals.
      ...times.slice(0, 3).map((t, i) => post(a.slug, epochCsv(t, GRID, i * 0.001), { token: a.ingestToken })),
    ]);
    expect(rs.every((r) => r.status === 201 || r.status === 200)).toBe(true);
    expect(rs.filter((r) => r.status === 201)).toHaveLength(20);
    expect(await counts(a.id)).toMatchObject({ epochs: 10, observations: 40, points: 4, audits: 10 });
    expect(await counts(b.id)).toMatchObject({ epochs: 10, observations: 40, points: 4, audits: 10 });
  });
});
