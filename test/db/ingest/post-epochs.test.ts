import { afterEach, describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { CT, GRID, counts, epochCsv, get, makeSite, makeToken, post } from "./helpers.ts";

const T1 = "2024-03-01T08:00:00Z";
const T2 = "2024-03-01T08:15:00Z";

afterEach(() => {
  delete process.env.EPOCHAL_MAX_UPLOAD_BYTES;
});

describe("POST /api/v1/sites/{slug}/epochs", () => {
  it("POST of a CSV epoch answers 201 with the epoch id, observation count and the new points", async () => {
    const s = await makeSite();
    const r = await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    expect(r.status).toBe(201);
    const epochs = r.json.epochs as { id: number; time: string; observations: number; outcome: string }[];
    expect(epochs).toHaveLength(1);
    expect(epochs[0]).toMatchObject({ time: "2024-03-01T08:00:00.000Z", observations: 4, outcome: "created" });
    expect(r.json.newPoints).toEqual(["P1", "P2", "P3", "P4"]);
    const stored = await getDb().observation.findMany({ where: { epochId: epochs[0].id }, include: { point: true }, orderBy: { point: { code: "asc" } } });
    expect(stored.map((o) => [o.point.code, o.east, o.sigmaEast, o.sigmaHeight])).toEqual([
      ["P1", 1000, 0.001, 0.0015],
      ["P2", 1010, 0.001, 0.0015],
      ["P3", 1005, 0.001, 0.0015],
      ["P4", 1015, 0.001, 0.0015],
    ]);
  });

  it("POST of the same content again answers 200 with the existing id and writes nothing", async () => {
    const s = await makeSite();
    const a = await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    const before = await counts(s.id);
    const b = await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    expect(b.status).toBe(200);
    expect((b.json.epochs as { id: number }[])[0].id).toBe((a.json.epochs as { id: number }[])[0].id);
    expect((b.json.epochs as { outcome: string }[])[0].outcome).toBe("unchanged");
    expect(b.json.newPoints).toEqual([]);
    expect(await counts(s.id)).toEqual(before);
  });

  it("POST of the same epoch as JSON after CSV hashes the same and answers 200", async () => {
    const s = await makeSite();
    await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    const json = { time: "2024-03-01T09:00:00+01:00", observations: [...GRID].reverse().map(([point, east, north, height]) => ({ point, east, north, height, sigma_east: 0.001 })) };
    const r = await post(s.slug, JSON.stringify(json), { token: s.ingestToken, type: CT.json });
    expect(r.status).toBe(200);
  });

  it("POST of different coordinates at a stored time answers 409 and stores nothing", async () => {
    const s = await makeSite();
    await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    const before = await counts(s.id);
    const r = await post(s.slug, epochCsv(T1, GRID, 0.002), { token: s.ingestToken });
    expect(r.status).toBe(409);
    expect((r.json.errors as { line: number; field: string }[])[0]).toMatchObject({ line: 2, field: "time" });
    expect((r.json.conflicts as { time: string }[])[0].time).toBe("2024-03-01T08:00:00.000Z");
    expect(await counts(s.id)).toEqual(before);
  });

  it("POST with ?revise=true stores a new revision, keeps the old one not current, and audits epoch.revise", async () => {
    const s = await makeSite();
    const a = await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    const oldId = (a.json.epochs as { id: number }[])[0].id;
    const r = await post(s.slug, epochCsv(T1, GRID, 0.002), { token: s.ingestToken, query: "?revise=true" });
    expect(r.status).toBe(201);
    const e = (r.json.epochs as { id: number; revision: number; outcome: string }[])[0];
    expect(e).toMatchObject({ revision: 2, outcome: "revised" });
    const rows = await getDb().epoch.findMany({ where: { siteId: s.id }, orderBy: { revision: "asc" } });
    expect(rows.map((x) => [x.id, x.revision, x.isCurrent])).toEqual([
      [oldId, 1, false],
      [e.id, 2, true],
    ]);
    expect(await getDb().observation.count({ where: { epochId: oldId } })).toBe(4);
    const audit = await getDb().auditEntry.findMany({ where: { siteId: s.id }, orderBy: { id: "asc" } });
    expect(audit.map((x) => x.action)).toEqual(["epoch.upload", "epoch.revise"]);
    expect(audit[1].before).toMatchObject({ id: oldId, revision: 1, observations: 4 });
    expect(audit[1].after).toMatchObject({ time: "2024-03-01T08:00:00.000Z", observations: 4 });
    // Re-sending the revised content is idempotent again.
    const again = await post(s.slug, epochCsv(T1, GRID, 0.002), { token: s.ingestToken, query: "?revise=true" });
    expect(again.status).toBe(200);
  });

  it("POST of a multi-epoch CSV stores a backfill in one request; ?time= dates a CSV without a time column", async () => {
    const s = await makeSite();
    const text = epochCsv(T1, GRID) + epochCsv(T2, GRID, 0.001).split("\n").slice(1).join("\n");
    const r = await post(s.slug, text, { token: s.ingestToken });
    expect(r.status).toBe(201);
    expect((r.json.epochs as { time: string }[]).map((e) => e.time)).toEqual(["2024-03-01T08:00:00.000Z", "2024-03-01T08:15:00.000Z"]);
    const q = await post(s.slug, epochCsv(null, GRID), { token: s.ingestToken, query: "?time=2024-03-01T08:30:00Z" });
    expect(q.status).toBe(201);
    expect((q.json.epochs as { time: string }[])[0].time).toBe("2024-03-01T08:30:00.000Z");
    const none = await post(s.slug, epochCsv(null, GRID), { token: s.ingestToken });
    expect(none.status).toBe(422);
    expect((none.json.errors as { line: number; field: string }[])[0]).toMatchObject({ line: 2, field: "time" });
  });

  it("POST of JSON { epochs: [...] } stores a backfill and file σ wins over the site default", async () => {
    const s = await makeSite({ sigmaHM: 0.002, sigmaVM: 0.003 });
    const body = { epochs: [T1, T2].map((time, k) => ({ time, observations: GRID.map(([point, east, north, height]) => ({ point, east: east + k * 0.001, north, height, ...(point === "P1" ? { sigma_east: 0.0005 } : {}) })) })) };
    const r = await post(s.slug, JSON.stringify(body), { token: s.ingestToken, type: CT.json });
    expect(r.status).toBe(201);
    const ids = (r.json.epochs as { id: number }[]).map((e) => e.id);
    const p1 = await getDb().observation.findFirst({ where: { epochId: ids[0], point: { code: "P1" } } });
    const p2 = await getDb().observation.findFirst({ where: { epochId: ids[0], point: { code: "P2" } } });
    expect([p1?.sigmaEast, p1?.sigmaNorth, p1?.sigmaHeight]).toEqual([0.0005, 0.002, 0.003]);
    expect([p2?.sigmaEast, p2?.sigmaHeight]).toEqual([0.002, 0.003]);
  });

  it("POST of GeoJSON converts WGS84 to the site frame about its origin; 422 when the site has no origin", async () => {
    const s = await makeSite({ originLatDeg: 47, originLonDeg: 8, originHeightM: 500 });
    const fc = { type: "FeatureCollection", features: [
      { type: "Feature", geometry: { type: "Point", coordinates: [8, 47, 500] }, properties: { point: "G0", time: T1 } },
      { type: "Feature", geometry: { type: "Point", coordinates: [8, 47, 512.5] }, properties: { point: "G1", time: T1, sigma_height: 0.01 } },
    ] };
    const r = await post(s.slug, JSON.stringify(fc), { token: s.ingestToken, type: CT.geojson });
    expect(r.status).toBe(201);
    const id = (r.json.epochs as { id: number }[])[0].id;
    const obs = await getDb().observation.findMany({ where: { epochId: id }, include: { point: true }, orderBy: { point: { code: "asc" } } });
    expect(Math.abs(obs[0].east) + Math.abs(obs[0].north) + Math.abs(obs[0].height)).toBeLessThan(1e-6);
    expect(Math.abs(obs[1].height - 12.5)).toBeLessThan(1e-6);
    expect(obs[1].sigmaHeight).toBe(0.01);
    const bare = await makeSite();
    const n = await post(bare.slug, JSON.stringify(fc), { token: bare.ingestToken, type: CT.geojson });
    expect(n.status).toBe(422);
    expect(await counts(bare.id)).toMatchObject({ epochs: 0, points: 0 });
  });

  it("POST to a site that refuses unknown points answers 422 naming the line and field of the first unknown point", async () => {
    const s = await makeSite({ refuseUnknownPoints: true });
    await getDb().point.createMany({ data: [{ siteId: s.id, code: "P1" }, { siteId: s.id, code: "P2" }] });
    const r = await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    expect(r.status).toBe(422);
    expect(r.json.errors).toEqual([
      { line: 4, field: "point", message: expect.stringContaining("P3") },
      { line: 5, field: "point", message: expect.stringContaining("P4") },
    ]);
    expect(await counts(s.id)).toMatchObject({ epochs: 0, points: 2 });
  });

  it("POST without a token answers 401, with an unknown token 401, with another site's token 403, with a read token 403", async () => {
    const s = await makeSite();
    const other = await makeSite();
    expect((await post(s.slug, epochCsv(T1, GRID), { token: null })).status).toBe(401);
    expect((await post(s.slug, epochCsv(T1, GRID), { token: "ept_not-a-real-token" })).status).toBe(401);
    expect((await post(s.slug, epochCsv(T1, GRID), { token: other.ingestToken })).status).toBe(403);
    expect((await post(s.slug, epochCsv(T1, GRID), { token: s.readToken })).status).toBe(403);
    expect(await counts(s.id)).toMatchObject({ epochs: 0 });
  });

  it("POST with an unsupported content type answers 415", async () => {
    const s = await makeSite();
    expect((await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken, type: "application/xml" })).status).toBe(415);
    expect((await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken, type: null })).status).toBe(415);
  });

  it("POST above EPOCHAL_MAX_UPLOAD_BYTES answers 413 from Content-Length, and from counting a streamed body", async () => {
    const s = await makeSite();
    process.env.EPOCHAL_MAX_UPLOAD_BYTES = "200";
    const big = epochCsv(T1, Array.from({ length: 20 }, (_, i): [string, number, number, number] => [`Q${i}`, i, i, i]));
    const a = await post(s.slug, big, { token: s.ingestToken, headers: { "content-length": String(big.length) } });
    expect(a.status).toBe(413);
    const bytes = new TextEncoder().encode(big);
    const stream = new ReadableStream<Uint8Array>({
      start(c) {
        for (let i = 0; i < bytes.length; i += 50) c.enqueue(bytes.slice(i, i + 50));
        c.close();
      },
    });
    const b = await post(s.slug, stream, { token: s.ingestToken });
    expect(b.status).toBe(413);
    expect(await counts(s.id)).toMatchObject({ epochs: 0, points: 0 });
  });

  it("POST of a bad CSV answers 422 with every error's line and field, and stores nothing", async () => {
    const s = await makeSite();
    const r = await post(s.slug, "# site A\npoint,East,north,height,time\nP1,1x,2,3,2024-03-01T08:00:00Z\nP2,1,2,3,2024-03-01T08:00:00\n", { token: s.ingestToken });
    expect(r.status).toBe(422);
    expect((r.json.errors as { line: number; field: string }[]).map((e) => [e.line, e.field])).toEqual([
      [3, "East"],
      [4, "time"],
    ]);
    expect(await counts(s.id)).toMatchObject({ epochs: 0, points: 0 });
  });

  it("POST writes one epoch.upload audit row per stored epoch with time, count and content hash", async () => {
    const s = await makeSite();
    const r = await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    const e = (r.json.epochs as { id: number; contentHash: string }[])[0];
    const a = await getDb().auditEntry.findMany({ where: { siteId: s.id } });
    expect(a).toHaveLength(1);
    expect(a[0]).toMatchObject({ action: "epoch.upload", entityType: "epoch", entityId: String(e.id) });
    expect(a[0].actor).toMatch(/^token:/);
    expect(a[0].after).toEqual({ time: "2024-03-01T08:00:00.000Z", observations: 4, contentHash: e.contentHash, revision: 1, source: "api" });
  });
});

describe("element results after ingest", () => {
  it("POST computes one cumulative ElementResult per enabled element and epoch, against the first epoch", async () => {
    const s = await makeSite();
    const db = getDb();
    await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    const tri = await db.element.create({ data: { siteId: s.id, name: "T1", kind: "triangle", mode: "plan", pointCodes: ["P1", "P2", "P3"] } });
    const base = await db.element.create({ data: { siteId: s.id, name: "B1", kind: "baseline", mode: "horizontal", pointCodes: ["P1", "P2"] } });
    await db.element.create({ data: { siteId: s.id, name: "OFF", kind: "baseline", mode: "slope", pointCodes: ["P1", "P2"], disabledAt: new Date() } });
    const miss = await db.element.create({ data: { siteId: s.id, name: "M", kind: "triangle", mode: "plan", pointCodes: ["P1", "P2", "P9"] } });
    // P2 moves 1 mm east: baseline P1–P2 (10 m) stretches by 1e-4 (derived: 0.001 / 10).
    const moved = GRID.map(([p, e, n, h]): [string, number, number, number] => [p, p === "P2" ? e + 0.001 : e, n, h]);
    const r = await post(s.slug, epochCsv(T2, moved), { token: s.ingestToken });
    const epochId = (r.json.epochs as { id: number }[])[0].id;
    const first = await db.epoch.findFirst({ where: { siteId: s.id }, orderBy: { time: "asc" } });
    const rows = await db.elementResult.findMany({ where: { epochId } });
    expect(rows).toHaveLength(3);
    const b = rows.find((x) => x.elementId === base.id);
    expect(b?.referenceEpochId).toBe(first?.id);
    expect(Math.abs((b?.engineering as number) - 1e-4)).toBeLessThan(1e-9);
    const t = rows.find((x) => x.elementId === tri.id);
    expect(t?.status).toBe("ok");
    expect(t?.greenMax as number).toBeGreaterThan(0);
    expect(t?.sigmaGreenMax as number).toBeGreaterThan(0);
    expect(rows.find((x) => x.elementId === miss.id)?.status).toBe("missing-point");
  });
});

describe("GET /api/v1/sites/{slug}/epochs and /points", () => {
  it("GET epochs filters by from/to and pages with a cursor, in time order", async () => {
    const s = await makeSite();
    const times = Array.from({ length: 5 }, (_, i) => new Date(Date.UTC(2024, 0, 1, 0, 15 * i)).toISOString());
    for (const [i, t] of times.entries()) await post(s.slug, epochCsv(t, GRID, i * 0.001), { token: s.ingestToken });
    const p1 = await get("epochs", s.slug, s.readToken, "?limit=2");
    expect(p1.status).toBe(200);
    expect((p1.json.epochs as { time: string }[]).map((e) => e.time)).toEqual(times.slice(0, 2));
    expect((p1.json.epochs as { observations: unknown[] }[])[0].observations).toHaveLength(4);
    const p2 = await get("epochs", s.slug, s.readToken, `?limit=2&cursor=${p1.json.nextCursor}`);
    expect((p2.json.epochs as { time: string }[]).map((e) => e.time)).toEqual(times.slice(2, 4));
    const p3 = await get("epochs", s.slug, s.readToken, `?limit=2&cursor=${p2.json.nextCursor}`);
    expect((p3.json.epochs as unknown[]).length).toBe(1);
    expect(p3.json.nextCursor).toBe(null);
    const range = await get("epochs", s.slug, s.readToken, `?from=${times[1]}&to=${times[3]}&observations=false`);
    expect((range.json.epochs as { time: string; observations?: unknown }[]).map((e) => e.time)).toEqual(times.slice(1, 4));
    expect((range.json.epochs as { observations?: unknown }[])[0].observations).toBeUndefined();
    expect((await get("epochs", s.slug, s.readToken, "?from=yesterday")).status).toBe(422);
  });

  it("GET points gives each point's latest displacement from the first epoch: dE, dN, dH, horizontal and 3D", async () => {
    const s = await makeSite();
    await post(s.slug, epochCsv(T1, GRID), { token: s.ingestToken });
    const moved = GRID.map(([p, e, n, h]): [string, number, number, number] => (p === "P1" ? [p, e + 0.003, n + 0.004, h - 0.012] : [p, e, n, h]));
    await post(s.slug, epochCsv(T2, moved), { token: s.ingestToken });
    await post(s.slug, epochCsv("2024-03-01T08:30:00Z", [["P9", 0, 0, 0]]), { token: s.ingestToken });
    const r = await get("points", s.slug, s.readToken);
    expect(r.status).toBe(200);
    const pts = r.json.points as { code: string; latest: { dE: number; dN: number; dH: number; dHorizontal: number; d3D: number; time: string } | null }[];
    const p1 = pts.find((p) => p.code === "P1")?.latest;
    expect(p1?.time).toBe("2024-03-01T08:15:00.000Z");
    // 3-4-5 and 3-4-12-13 triangles (exact up to floating-point rounding of the coordinates).
    expect(Math.abs((p1?.dHorizontal as number) - 0.005)).toBeLessThan(1e-9);
    expect(Math.abs((p1?.d3D as number) - 0.013)).toBeLessThan(1e-9);
    expect(Math.abs((p1?.dH as number) + 0.012)).toBeLessThan(1e-9);
    const p9 = pts.find((p) => p.code === "P9")?.latest;
    expect(p9?.dE).toBe(null);
    expect((r.json.referenceEpoch as { time: string }).time).toBe("2024-03-01T08:00:00.000Z");
  });

  it("GET with a token of another site answers 403", async () => {
    const s = await makeSite();
    const other = await makeSite();
    expect((await get("points", s.slug, other.readToken)).status).toBe(403);
    expect((await get("epochs", s.slug, await makeToken(other.id, "ingest"))).status).toBe(403);
  });
});
