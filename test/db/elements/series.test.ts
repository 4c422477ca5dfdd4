import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import * as list from "../../../app/api/v1/sites/[slug]/elements/route.ts";
import * as series from "../../../app/api/v1/sites/[slug]/elements/[id]/series/route.ts";
import * as trend from "../../../app/api/v1/sites/[slug]/elements/[id]/trend/route.ts";
import * as pointSeries from "../../../app/api/v1/sites/[slug]/points/[code]/series/route.ts";
import { decodeFloat8BE, decodePgTimestampsMs } from "../../../lib/series/packed.ts";
import { parseCopyBinary, readInt4 } from "../../../lib/formats/pg-copy-binary.ts";
import { pgCopyOut } from "../../../lib/server/ingest/pg-tx.ts";
import { addEpochs, call, hoursAfter, makeSite, sessionFor, SIGMA_H } from "./fixtures.ts";

const T0 = "2026-03-01T00:00:00.000Z";
type Pt = { t: string; local: string; value: number; sigma: number | null; significant: boolean | null };

let site: Awaited<ReturnType<typeof makeSite>>;
let viewer: string;
let baselineId: string;
let triangleId: string;

beforeAll(async () => {
  site = await makeSite({ points: ["A", "B", "C"], timeZone: "Europe/Zurich" });
  // Epoch k (every 12 h): B moves k mm east of 10 m → engineering strain k·1e-4 (hand-computed).
  await addEpochs(
    site,
    Array.from({ length: 8 }, (_, k) => ({ time: hoursAfter(T0, 12 * k), points: { A: { east: 0, north: 0 }, B: { east: 10 + 0.001 * k, north: 0 }, C: { east: 5, north: 8.66 } } })),
  );
  const engineer = await sessionFor(site.id, "engineer");
  viewer = await sessionFor(site.id, "viewer");
  const b = await call(list.POST, { method: "POST", path: "/x", params: { slug: site.slug }, cookie: engineer, body: { name: "AB", kind: "baseline", points: ["A", "B"] } });
  baselineId = String((b.json.element as { id: number }).id);
  const t = await call(list.POST, { method: "POST", path: "/x", params: { slug: site.slug }, cookie: engineer, body: { name: "ABC", kind: "triangle", points: ["A", "B", "C"] } });
  triangleId = String((t.json.element as { id: number }).id);
});

const get = (id: string, query: Record<string, string | number>) =>
  call(series.GET, { method: "GET", path: `/api/v1/sites/${site.slug}/elements/${id}/series`, params: { slug: site.slug, id }, cookie: viewer, query });

describe("GET /api/v1/sites/{slug}/elements/{id}/series", () => {
  it("returns the cumulative series in UTC with the site's local time, σ and significance", async () => {
    const r = await get(baselineId, { quantity: "engineering" });
    expect(r.status).toBe(200);
    expect(r.json).toMatchObject({ mode: "cumulative", unit: "strain", timeZone: "Europe/Zurich", count: 8, downsampled: false });
    const pts = r.json.points as Pt[];
    expect(pts[0].t).toBe("2026-03-01T00:00:00.000Z");
    expect(pts[0].local).toBe("2026-03-01T01:00:00.000+01:00");
    pts.forEach((p, k) => expect(p.value).toBeCloseTo(k * 1e-4, 10));
    // σ(engineering) of a 10 m baseline with 1 mm σ on both ends in both epochs ≈ √4·1 mm / 10 m = 2e-4 (first order).
    expect(pts[7].sigma).toBeCloseTo((2 * SIGMA_H) / 10, 6);
    expect(pts[1].significant).toBe(false); // 1e-4 < 1.96 · 2e-4
    expect(pts[7].significant).toBe(true); // 7e-4 > 3.92e-4
  });

  it("returns increments with σ = √(σ₁² + σ₂²) and rates per day", async () => {
    const inc = await get(baselineId, { quantity: "engineering", mode: "incremental" });
    const ip = inc.json.points as Pt[];
    expect(ip).toHaveLength(7);
    expect(ip[0].t).toBe(hoursAfter(T0, 12));
    ip.forEach((p) => expect(p.value).toBeCloseTo(1e-4, 10));
    const cum = (await get(baselineId, { quantity: "engineering" })).json.points as Pt[];
    expect(ip[3].sigma).toBeCloseTo(Math.hypot(cum[4].sigma!, cum[3].sigma!), 15);
    expect(ip.every((p) => p.significant === false)).toBe(true);
    const rate = await get(baselineId, { quantity: "engineering", mode: "rate" });
    expect(rate.json.unit).toBe("strain/day");
    (rate.json.points as Pt[]).forEach((p) => expect(p.value).toBeCloseTo(2e-4, 9)); // 1e-4 per half day
  });

  it("honours from/to, and an increment at `from` uses the epoch before it", async () => {
    const r = await get(baselineId, { quantity: "engineering", mode: "incremental", from: hoursAfter(T0, 36), to: hoursAfter(T0, 60) });
    const pts = r.json.points as Pt[];
    expect(pts.map((p) => p.t)).toEqual([hoursAfter(T0, 36), hoursAfter(T0, 48), hoursAfter(T0, 60)]);
    pts.forEach((p) => expect(p.value).toBeCloseTo(1e-4, 10));
  });

  it("gives rotation without σ (null) and refuses a baseline quantity for a triangle, naming the field", async () => {
    const r = await get(triangleId, { quantity: "rotationDeg" });
    expect((r.json.points as Pt[])[3]).toMatchObject({ sigma: null, significant: null });
    const bad = await get(triangleId, { quantity: "engineering" });
    expect(bad.status).toBe(422);
    expect((bad.json.errors as { field: string }[])[0].field).toBe("quantity");
    const unknown = await get(triangleId, { quantity: "volume" });
    expect(unknown.status).toBe(422);
    expect((unknown.json.errors as { field: string }[])[0].field).toBe("quantity");
  });

  it("respects maxPoints on a long series and keeps its first, last and peak points", async () => {
    // 3,000 epochs of results written straight into ElementResult (the series reads only those rows).
    const db = getDb();
    const s = await makeSite({ points: ["A", "B"] });
    const [ref] = await addEpochs(s, [{ time: T0, points: { A: { east: 0, north: 0 }, B: { east: 10, north: 0 } } }]);
    const el = await db.element.create({ data: { siteId: s.id, name: "long", kind: "baseline", mode: "slope", pointCodes: ["A", "B"] } });
    await db.$executeRawUnsafe(
      `INSERT INTO "Epoch"("siteId", "time", "contentHash") SELECT $1, $2::timestamptz + g * interval '15 minutes', 'long-' || g FROM generate_series(1, 2999) g`,
      s.id,
      T0,
    );
    await db.$executeRawUnsafe(
      `INSERT INTO "ElementResult"("elementId", "epochId", "referenceEpochId", "time", status, engineering, "sigmaEngineering")
       SELECT $1, e.id, $2, e."time", 'ok', CASE WHEN e."time" = $3::timestamptz + interval '15 minutes' * 1234 THEN 0.01 ELSE sin(extract(epoch FROM e."time") / 86400) * 1e-4 END, 2e-4
         FROM "Epoch" e WHERE e."siteId" = $4`,
      el.id,
      ref,
      T0,
      s.id,
    );
    const v = await sessionFor(s.id, "viewer");
    const r = await call(series.GET, { method: "GET", path: "/x", params: { slug: s.slug, id: String(el.id) }, cookie: v, query: { quantity: "engineering", maxPoints: 100 } });
    expect(r.status).toBe(200);
    const pts = r.json.points as Pt[];
    expect(r.json).toMatchObject({ count: 3000, downsampled: true });
    expect(pts.length).toBeLessThanOrEqual(100);
    expect(pts.length).toBeGreaterThan(50);
    expect(pts[0].t).toBe(T0);
    expect(pts[pts.length - 1].t).toBe(new Date(Date.parse(T0) + 2999 * 900_000).toISOString());
    expect(pts.find((p) => p.value === 0.01)?.t).toBe(new Date(Date.parse(T0) + 1234 * 900_000).toISOString());
    const tooMany = await call(series.GET, { method: "GET", path: "/x", params: { slug: s.slug, id: String(el.id) }, cookie: v, query: { quantity: "engineering", maxPoints: 5 } });
    expect(tooMany.status).toBe(422);
    expect((tooMany.json.errors as { field: string }[])[0].field).toBe("maxPoints");
  });

  it("leaves out the results of a superseded epoch revision", async () => {
    const db = getDb();
    const s = await makeSite({ points: ["A", "B"] });
    const [ref, second] = await addEpochs(s, [
      { time: T0, points: { A: { east: 0, north: 0 }, B: { east: 10, north: 0 } } },
      { time: hoursAfter(T0, 1), points: { A: { east: 0, north: 0 }, B: { east: 10.001, north: 0 } } },
    ]);
    const engineer = await sessionFor(s.id, "engineer");
    const c = await call(list.POST, { method: "POST", path: "/x", params: { slug: s.slug }, cookie: engineer, body: { name: "AB", kind: "baseline", points: ["A", "B"] } });
    const id = (c.json.element as { id: number }).id;
    // Revision 2 of the second epoch supersedes revision 1 (as the ingest service does: flag, never delete).
    await db.epoch.update({ where: { id: second }, data: { isCurrent: false } });
    const rev = await db.epoch.create({ data: { siteId: s.id, time: new Date(hoursAfter(T0, 1)), revision: 2, contentHash: `rev2-${id}` } });
    await db.elementResult.create({ data: { elementId: id, epochId: rev.id, referenceEpochId: ref, time: rev.time, status: "ok", engineering: 3e-4, sigmaEngineering: 2e-4 } });
    const r = await call(series.GET, { method: "GET", path: "/x", params: { slug: s.slug, id: String(id) }, cookie: engineer, query: { quantity: "engineering" } });
    expect((r.json.points as Pt[]).map((p) => p.value)).toEqual([expect.closeTo(0, 12), 3e-4]);
  });

  it("returns a back-filled series in time order, with increments between neighbours in time", async () => {
    // Results stored newest first (a site whose history was loaded backwards): the read takes rows in
    // storage order and must give the same series as rows stored in time order.
    const db = getDb();
    const s = await makeSite({ points: ["A", "B"] });
    const [ref] = await addEpochs(s, [{ time: T0, points: { A: { east: 0, north: 0 }, B: { east: 10, north: 0 } } }]);
    const el = await db.element.create({ data: { siteId: s.id, name: "backfilled", kind: "baseline", mode: "slope", pointCodes: ["A", "B"], referenceEpochId: ref } });
    const later = await addEpochs(s, Array.from({ length: 6 }, (_, k) => ({ time: hoursAfter(T0, 6 * (6 - k)), points: { A: { east: 0, north: 0 }, B: { east: 10, north: 0 } } })));
    const epochs = await db.epoch.findMany({ where: { id: { in: [ref, ...later] } }, select: { id: true, time: true } });
    const byId = new Map(epochs.map((e) => [e.id, e.time]));
    // Value k·1e-4 at hour 6k (hand-computed), written in decreasing time.
    for (const epochId of [...later, ref]) {
      const time = byId.get(epochId) as Date;
      const k = (time.getTime() - Date.parse(T0)) / (6 * 3600_000);
      await db.elementResult.create({ data: { elementId: el.id, epochId, referenceEpochId: ref, time, status: "ok", engineering: k * 1e-4, sigmaEngineering: 2e-4 } });
    }
    const v = await sessionFor(s.id, "viewer");
    const cum = await call(series.GET, { method: "GET", path: "/x", params: { slug: s.slug, id: String(el.id) }, cookie: v, query: { quantity: "engineering" } });
    const pts = cum.json.points as Pt[];
    expect(pts.map((p) => p.t)).toEqual(Array.from({ length: 7 }, (_, k) => hoursAfter(T0, 6 * k)));
    pts.forEach((p, k) => expect(p.value).toBeCloseTo(k * 1e-4, 12));
    const rate = await call(series.GET, { method: "GET", path: "/x", params: { slug: s.slug, id: String(el.id) }, cookie: v, query: { quantity: "engineering", mode: "rate" } });
    // 1e-4 every 6 h = 4e-4 per day between each pair of neighbours in time.
    (rate.json.points as Pt[]).forEach((p) => expect(p.value).toBeCloseTo(4e-4, 12));
  });

  it("decodes PostgreSQL's own binary COPY of int4, NULL, timestamptz_send and float8send back to the same numbers and instants", async () => {
    const times = ["1999-12-31T23:59:59.999Z", "2000-01-01T00:00:00.000Z", "2026-03-29T01:00:00.001Z", "2107-06-30T12:34:56.789Z"];
    const values = [0, -1.5e-4, Math.PI, 5e-324];
    const tArr = `ARRAY[${times.map((t) => `'${t}'::timestamptz`).join(", ")}]`;
    const vArr = `ARRAY[${values.map((v) => `${v.toPrecision(17)}::float8`).join(", ")}]`;
    const bytes = await pgCopyOut(
      `COPY (SELECT (-35040)::int AS n, NULL::bytea AS nothing, string_agg(timestamptz_send(t), ''::bytea ORDER BY k) AS t, string_agg(float8send(v), ''::bytea ORDER BY k) AS v
               FROM unnest(${tArr}, ${vArr}) WITH ORDINALITY AS u(t, v, k)) TO STDOUT (FORMAT binary)`,
    );
    const rows = parseCopyBinary(bytes);
    expect(rows).toHaveLength(1);
    const [n, nothing, t, v] = rows[0];
    expect(readInt4(n!)).toBe(-35040);
    expect(nothing).toBeNull();
    expect(Array.from(decodePgTimestampsMs(t, 4))).toEqual(times.map((x) => Date.parse(x)));
    expect(Array.from(decodeFloat8BE(v, 4))).toEqual(values);
  });

  it("reads the series against the element's new reference after re-baselining", async () => {
    const db = getDb();
    const epochs = await db.epoch.findMany({ where: { siteId: site.id }, orderBy: { time: "asc" } });
    const engineer = await sessionFor(site.id, "engineer");
    const one = await import("../../../app/api/v1/sites/[slug]/elements/[id]/route.ts");
    const c = await call(list.POST, { method: "POST", path: "/x", params: { slug: site.slug }, cookie: engineer, body: { name: "AB2", kind: "baseline", points: ["A", "B"] } });
    const id = String((c.json.element as { id: number }).id);
    await call(one.PATCH, { method: "PATCH", path: "/x", params: { slug: site.slug, id }, cookie: engineer, body: { referenceEpochId: epochs[4].id } });
    const r = await get(id, { quantity: "engineering" });
    const pts = r.json.points as Pt[];
    expect(r.json.referenceEpoch).toMatchObject({ id: epochs[4].id });
    expect(pts).toHaveLength(4);
    expect(pts[0].value).toBeCloseTo(0, 12);
  });
});

describe("GET /api/v1/sites/{slug}/points/{code}/series", () => {
  const getP = (code: string, query: Record<string, string | number>) =>
    call(pointSeries.GET, { method: "GET", path: "/x", params: { slug: site.slug, code }, cookie: viewer, query });

  it("returns dE against the site's reference epoch with σ = √2·σ and χ²-tested lengths", async () => {
    const r = await getP("B", { component: "dE" });
    expect(r.status).toBe(200);
    const pts = r.json.points as Pt[];
    expect(pts).toHaveLength(8);
    pts.forEach((p, k) => expect(p.value).toBeCloseTo(0.001 * k, 12));
    expect(pts[1].sigma).toBeCloseTo(Math.SQRT2 * SIGMA_H, 12);
    expect(pts[3].significant).toBe(true); // 3 mm > 1.96 · 1.41 mm
    const d2 = (await getP("B", { component: "d2D" })).json.points as Pt[];
    expect(d2[2].value).toBeCloseTo(0.002, 12);
    // χ²: (2/1.414)² = 2 < 5.991 → not significant; (4/1.414)² = 8 > 5.991 → significant.
    expect(d2[2].significant).toBe(false);
    expect(d2[4].significant).toBe(true);
    const rate = (await getP("B", { component: "dE", mode: "rate" })).json.points as Pt[];
    rate.forEach((p) => expect(p.value).toBeCloseTo(0.002, 9)); // 1 mm per half day
  });

  it("answers 404 for an unknown point and 422 naming `component` for a bad one", async () => {
    expect((await getP("NOPE", { component: "dE" })).status).toBe(404);
    const bad = await getP("B", { component: "dX" });
    expect(bad.status).toBe(422);
    expect((bad.json.errors as { field: string }[])[0].field).toBe("component");
  });
});

describe("GET /api/v1/sites/{slug}/elements/{id}/trend", () => {
  it("fits the trend over the window, projects level crossings and carries cautions", async () => {
    const r = await call(trend.GET, { method: "GET", path: "/x", params: { slug: site.slug, id: baselineId }, cookie: viewer, query: { quantity: "engineering", window: "P30D", levels: "0.0005,0.001,-0.001" } });
    expect(r.status).toBe(200);
    const t = r.json.trend as { status: string; slopePerDay: number; rSquared: number; caution: string };
    expect(t.status).toBe("ok");
    expect(t.slopePerDay).toBeCloseTo(2e-4, 9); // 1e-4 per 12 h
    expect(t.rSquared).toBeCloseTo(1, 9);
    const c = r.json.crossings as { level: number; status: string; time?: string }[];
    expect(c[0].status).toBe("reached");
    // At 3.5 days the trend is 7e-4; 1e-3 is 1.5 days later (hand-computed).
    expect(c[1]).toMatchObject({ status: "projected", time: hoursAfter(T0, 84 + 36) });
    expect(c[2].status).toBe("not-approaching");
    const iv = r.json.inverseVelocity as { status: string; applicable: boolean; caution: string };
    expect(iv.applicable).toBe(false); // constant velocity
    expect(iv.caution).toMatch(/not a prediction/);
    expect(typeof r.json.caution).toBe("string");
  });

  it("uses the element's trigger-rule levels when none are given, and refuses a bad window naming it", async () => {
    await getDb().triggerRule.create({ data: { siteId: site.id, name: "AB tension", quantity: "engineering", elementIds: [Number(baselineId)], reviewLevel: 0.001, alertLevel: 0.002, limitLevel: 0.003 } });
    const r = await call(trend.GET, { method: "GET", path: "/x", params: { slug: site.slug, id: baselineId }, cookie: viewer, query: { quantity: "engineering" } });
    expect(r.json.levels).toEqual([0.001, 0.002, 0.003]);
    expect(r.json.levelSource).toMatch(/AB tension/);
    const bad = await call(trend.GET, { method: "GET", path: "/x", params: { slug: site.slug, id: baselineId }, cookie: viewer, query: { quantity: "engineering", window: "30 days" } });
    expect(bad.status).toBe(422);
    expect((bad.json.errors as { field: string }[])[0].field).toBe("window");
  });
});
