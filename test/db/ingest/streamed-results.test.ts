/**
 * A live epoch's element results are streamed to the server while they are computed, in slices of
 * triangles (lib/server/results/store.ts `streamResultRows`). On a site with more triangles than one
 * slice, every row must be stored once with its value: a plan grid stretched uniformly by (1 + s)
 * gives every triangle Green-Lagrange greenMax = s + s²/2 and zero shear (analytic; domain.md §8).
 */
import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { makeSite, post } from "./helpers.ts";

const N = 36; // 36 × 36 points, 2 × 35 × 35 = 2,450 triangles: three slices of at most 1,000
const S = 4e-4;

function csv(time: string, s: number): string {
  const lines = ["point,east,north,height,time"];
  for (let i = 0; i < N; i++) for (let j = 0; j < N; j++) lines.push(`G${i}_${j},${1000 + 5 * i * (1 + s)},${2000 + 5 * j * (1 + s)},100,${time}`);
  return lines.join("\n") + "\n";
}

describe("streamed element results", () => {
  it("2,450 triangles of a uniformly stretched grid: every row stored once, greenMax = s + s²/2", async () => {
    const site = await makeSite();
    const db = getDb();
    const data: { siteId: number; name: string; kind: string; mode: string; pointCodes: string[] }[] = [];
    for (let i = 0; i < N - 1; i++)
      for (let j = 0; j < N - 1; j++) {
        data.push({ siteId: site.id, name: `a${i}_${j}`, kind: "triangle", mode: "plan", pointCodes: [`G${i}_${j}`, `G${i + 1}_${j}`, `G${i}_${j + 1}`] });
        data.push({ siteId: site.id, name: `b${i}_${j}`, kind: "triangle", mode: "plan", pointCodes: [`G${i + 1}_${j}`, `G${i + 1}_${j + 1}`, `G${i}_${j + 1}`] });
      }
    await db.element.createMany({ data });
    expect((await post(site.slug, csv("2026-04-01T00:00:00Z", 0), { token: site.ingestToken })).status).toBe(201);
    const r = await post(site.slug, csv("2026-04-01T01:00:00Z", S), { token: site.ingestToken });
    expect(r.status).toBe(201);
    const epochId = (r.json.epochs as { id: number }[])[0].id;
    const rows = await db.elementResult.findMany({ where: { epochId }, select: { elementId: true, status: true, greenMax: true, maxShear: true } });
    expect(rows).toHaveLength(2 * (N - 1) * (N - 1));
    expect(new Set(rows.map((x) => x.elementId)).size).toBe(rows.length);
    const want = S + (S * S) / 2;
    const worst = Math.max(...rows.map((x) => Math.abs((x.greenMax as number) - want)));
    expect(rows.every((x) => x.status === "ok")).toBe(true);
    expect(worst).toBeLessThan(1e-9);
    expect(Math.max(...rows.map((x) => Math.abs(x.maxShear as number)))).toBeLessThan(1e-9);
  });
});
