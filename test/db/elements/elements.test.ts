import { beforeAll, describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import * as list from "../../../app/api/v1/sites/[slug]/elements/route.ts";
import * as one from "../../../app/api/v1/sites/[slug]/elements/[id]/route.ts";
import * as preview from "../../../app/api/v1/sites/[slug]/elements/preview-triangulation/route.ts";
import { addEpochs, call, hoursAfter, makeSite, sessionFor, type EpochSpec } from "./fixtures.ts";

// Six points: Delaunay gives four well-shaped triangles and one sliver B-D-F (1.1°), checked by hand.
const PLAN = { A: { east: 0, north: 0 }, B: { east: 10, north: 0 }, C: { east: 5, north: 8.66 }, D: { east: 20, north: 1 }, E: { east: 15, north: 9 }, F: { east: 15, north: 0.6 } };
const T0 = "2026-01-01T00:00:00.000Z";

/** Epoch k: B moved k mm east; everything else fixed (baseline A-B: engineering strain k·1e-4). */
function epochs(n: number): EpochSpec[] {
  return Array.from({ length: n }, (_, k) => ({ time: hoursAfter(T0, 12 * k), points: { ...PLAN, B: { east: 10 + 0.001 * k, north: 0 } } }));
}

let site: Awaited<ReturnType<typeof makeSite>>;
let epochIds: number[];
let engineer: string;
let viewer: string;
const P = (): { slug: string } => ({ slug: site.slug });
const path = (): string => `/api/v1/sites/${site.slug}/elements`;

beforeAll(async () => {
  site = await makeSite({ points: Object.keys(PLAN) });
  epochIds = await addEpochs(site, epochs(6));
  engineer = await sessionFor(site.id, "engineer");
  viewer = await sessionFor(site.id, "viewer");
});

describe("POST /api/v1/sites/{slug}/elements (by hand)", () => {
  it("creates a named, labelled baseline and computes its results at every current epoch, with an audit row", async () => {
    const r = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { name: "AB", label: "north façade, No. 12", kind: "baseline", points: ["A", "B"] } });
    expect(r.status).toBe(201);
    const el = r.json.element as { id: number; name: string; label: string; mode: string; effectiveReferenceEpochId: number; referenceEpochId: number | null };
    expect(el).toMatchObject({ name: "AB", label: "north façade, No. 12", mode: "slope", referenceEpochId: null, effectiveReferenceEpochId: epochIds[0] });
    expect(r.json.resultsWritten).toBe(6);
    const rows = await getDb().elementResult.findMany({ where: { elementId: el.id }, orderBy: { time: "asc" } });
    expect(rows.map((x) => x.referenceEpochId)).toEqual(Array(6).fill(epochIds[0]));
    // B moved 5 mm over 10 m: engineering strain 5e-4 (hand-computed).
    expect(rows[5].engineering).toBeCloseTo(5e-4, 9);
    expect(rows[0].engineering).toBeCloseTo(0, 12);
    const audit = await getDb().auditEntry.findMany({ where: { siteId: site.id, action: "element.create", entityId: String(el.id) } });
    expect(audit).toHaveLength(1);
    expect(audit[0].entityType).toBe("element");
  });

  it("creates a surface triangle and a plan group; never writes observations", async () => {
    const before = await getDb().observation.count({ where: { epoch: { siteId: site.id } } });
    const t = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { name: "wall ABC", kind: "triangle", mode: "surface", points: ["A", "B", "C"] } });
    expect(t.status).toBe(201);
    const g = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { name: "group ABCE", kind: "group", mode: "plan", points: ["A", "B", "C", "E"] } });
    expect(g.status).toBe(201);
    expect(await getDb().observation.count({ where: { epoch: { siteId: site.id } } })).toBe(before);
  });

  it.each([
    [{ name: "x1", kind: "triangle", points: ["A", "B"] }, "points", /exactly 3/],
    [{ name: "x2", kind: "baseline", points: ["A", "B", "C"] }, "points", /exactly 2/],
    [{ name: "x3", kind: "group", points: ["A", "B"] }, "points", /at least 3/],
    [{ name: "x4", kind: "group", mode: "volume", points: ["A", "B", "C"] }, "points", /at least 4/],
    [{ name: "x5", kind: "triangle", points: ["A", "B", "A"] }, "points", /twice/],
    [{ name: "x6", kind: "baseline", mode: "plan", points: ["A", "B"] }, "mode", /not a baseline mode/],
    [{ name: "x7", kind: "triangle", points: ["A", "B", "Z9"] }, "points", /no point Z9/],
    [{ name: "", kind: "triangle", points: ["A", "B", "C"] }, "name", /required/],
    [{ name: "x8", kind: "square", points: ["A", "B", "C"] }, "kind", /./],
  ])("refuses %j with 422 naming the field %s", async (body, field, message) => {
    const r = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body });
    expect(r.status).toBe(422);
    const errors = r.json.errors as { field: string; message: string }[];
    expect(errors.some((e) => e.field === field && message.test(e.message))).toBe(true);
  });

  it("refuses a name already used on the site with 409 naming the field", async () => {
    const r = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { name: "AB", kind: "baseline", points: ["A", "C"] } });
    expect(r.status).toBe(409);
    expect((r.json.errors as { field: string }[])[0].field).toBe("name");
  });

  it("refuses a reference epoch of another site, naming referenceEpochId", async () => {
    const other = await makeSite({ points: ["Q"] });
    const [foreign] = await addEpochs(other, [{ time: T0, points: { Q: { east: 0, north: 0 } } }]);
    const r = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { name: "x9", kind: "baseline", points: ["A", "C"], referenceEpochId: foreign } });
    expect(r.status).toBe(422);
    expect((r.json.errors as { field: string }[])[0].field).toBe("referenceEpochId");
  });
});

describe("POST /api/v1/sites/{slug}/elements/preview-triangulation", () => {
  it("returns the kept triangles, the dropped sliver with its reason and the quality figure, and writes nothing", async () => {
    const db = getDb();
    const count = async (): Promise<number[]> => [
      await db.element.count({ where: { siteId: site.id } }),
      await db.elementResult.count({ where: { elementId: { in: (await db.element.findMany({ where: { siteId: site.id }, select: { id: true } })).map((e) => e.id) } } }),
      await db.auditEntry.count({ where: { siteId: site.id } }),
    ];
    const before = await count();
    const r = await call(preview.POST, { method: "POST", path: `${path()}/preview-triangulation`, params: P(), cookie: engineer, body: { namePrefix: "T " } });
    expect(r.status).toBe(200);
    const tri = r.json.triangles as { name: string; codes: string[] }[];
    expect(tri.map((t) => t.name)).toEqual(["T A-B-C", "T B-E-C", "T B-F-E", "T D-E-F"]);
    expect(r.json.dropped).toEqual([expect.objectContaining({ id: "B-D-F", reason: "sliver" })]);
    const q = r.json.quality as { minAngleDeg: number };
    expect(q.minAngleDeg).toBeGreaterThan(20);
    expect(await count()).toEqual(before);
  });

  it("drops long edges when maxEdgeM is given", async () => {
    const r = await call(preview.POST, { method: "POST", path: `${path()}/preview-triangulation`, params: P(), cookie: engineer, body: { maxEdgeM: 10.1 } });
    // Longest edges (hand-computed): A-B-C 10 m, D-E-F 9.43 m, B-E-C and B-F-E 10.30 m (B to E).
    expect((r.json.triangles as { id: string }[]).map((t) => t.id)).toEqual(["A-B-C", "D-E-F"]);
    expect((r.json.dropped as { id: string; reason: string }[]).filter((d) => d.reason === "long-edge").map((d) => d.id)).toEqual(["B-E-C", "B-F-E"]);
  });

  it("names the field of a bad option", async () => {
    const r = await call(preview.POST, { method: "POST", path: `${path()}/preview-triangulation`, params: P(), cookie: engineer, body: { minAngleDeg: 75 } });
    expect(r.status).toBe(422);
    expect((r.json.errors as { field: string }[])[0].field).toBe("minAngleDeg");
  });
});

describe("POST /api/v1/sites/{slug}/elements {generate}", () => {
  it("saves the triangulation's triangles as plan elements with results, and skips them the second time", async () => {
    const r = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { generate: { namePrefix: "G " } } });
    expect(r.status).toBe(201);
    const created = r.json.created as { id: number; name: string; kind: string; mode: string; source: string; minAngleDeg: number }[];
    expect(created.map((c) => c.name)).toEqual(["G A-B-C", "G B-E-C", "G B-F-E", "G D-E-F"]);
    expect(created.every((c) => c.kind === "triangle" && c.mode === "plan" && c.source === "triangulation" && c.minAngleDeg >= 20)).toBe(true);
    expect(r.json.resultsWritten).toBe(4 * 6);
    const again = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { generate: { namePrefix: "G " } } });
    expect(again.status).toBe(201);
    expect(again.json.created).toEqual([]);
    expect(again.json.skipped).toHaveLength(4);
  });

  it("triangulates only the points of one group when pointGroup is given", async () => {
    const s = await makeSite({ points: Object.keys(PLAN), groups: { A: "roof", B: "roof", C: "roof" } });
    await addEpochs(s, epochs(2));
    const eng = await sessionFor(s.id, "engineer");
    const r = await call(list.POST, { method: "POST", path: `/api/v1/sites/${s.slug}/elements`, params: { slug: s.slug }, cookie: eng, body: { generate: { pointGroup: "roof" } } });
    expect((r.json.created as { name: string }[]).map((c) => c.name)).toEqual(["A-B-C"]);
  });
});

describe("PATCH and DELETE /api/v1/sites/{slug}/elements/{id}", () => {
  it("re-baselines on a later epoch: new rows against it, the rows against the old reference kept", async () => {
    const db = getDb();
    const c = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { name: "AB rebase", kind: "baseline", points: ["A", "B"] } });
    const id = (c.json.element as { id: number }).id;
    const r = await call(one.PATCH, { method: "PATCH", path: `${path()}/${id}`, params: { ...P(), id: String(id) }, cookie: engineer, body: { referenceEpochId: epochIds[2] } });
    expect(r.status).toBe(200);
    expect(r.json.element).toMatchObject({ referenceEpochId: epochIds[2], effectiveReferenceEpochId: epochIds[2] });
    expect(r.json.resultsWritten).toBe(4);
    const old = await db.elementResult.findMany({ where: { elementId: id, referenceEpochId: epochIds[0] } });
    expect(old).toHaveLength(6);
    const fresh = await db.elementResult.findMany({ where: { elementId: id, referenceEpochId: epochIds[2] }, orderBy: { time: "asc" } });
    expect(fresh.map((x) => x.epochId)).toEqual(epochIds.slice(2));
    // Against epoch 2 (B at +2 mm) the last epoch (B at +5 mm) is 3 mm over 10.002 m.
    expect(fresh[3].engineering).toBeCloseTo(0.003 / 10.002, 9);
    const audit = await db.auditEntry.findMany({ where: { siteId: site.id, action: "element.rebaseline", entityId: String(id) } });
    expect(audit).toHaveLength(1);
  });

  it("renames and relabels; refuses an empty patch naming no field but saying why", async () => {
    const c = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { name: "AC", kind: "baseline", points: ["A", "C"] } });
    const id = String((c.json.element as { id: number }).id);
    const r = await call(one.PATCH, { method: "PATCH", path: `${path()}/${id}`, params: { ...P(), id }, cookie: engineer, body: { name: "AC west", label: "west wall" } });
    expect(r.json.element).toMatchObject({ name: "AC west", label: "west wall" });
    const empty = await call(one.PATCH, { method: "PATCH", path: `${path()}/${id}`, params: { ...P(), id }, cookie: engineer, body: {} });
    expect(empty.status).toBe(422);
  });

  it("DELETE disables the element and keeps its results; GET lists it only with includeDisabled", async () => {
    const c = await call(list.POST, { method: "POST", path: path(), params: P(), cookie: engineer, body: { name: "BC", kind: "baseline", points: ["B", "C"] } });
    const id = (c.json.element as { id: number }).id;
    const d = await call(one.DELETE, { method: "DELETE", path: `${path()}/${id}`, params: { ...P(), id: String(id) }, cookie: engineer });
    expect(d.status).toBe(200);
    expect(d.json.element).toMatchObject({ disabled: true });
    expect(await getDb().elementResult.count({ where: { elementId: id } })).toBe(6);
    const l = await call(list.GET, { method: "GET", path: path(), params: P(), cookie: viewer });
    expect((l.json.elements as { id: number }[]).some((e) => e.id === id)).toBe(false);
    const all = await call(list.GET, { method: "GET", path: path(), params: P(), cookie: viewer, query: { includeDisabled: 1 } });
    expect((all.json.elements as { id: number }[]).some((e) => e.id === id)).toBe(true);
  });

  it("answers 404 for an element of another site", async () => {
    const other = await makeSite({ points: ["A", "B"] });
    const el = await getDb().element.create({ data: { siteId: other.id, name: "foreign", kind: "baseline", mode: "slope", pointCodes: ["A", "B"] } });
    const r = await call(one.GET, { method: "GET", path: `${path()}/${el.id}`, params: { ...P(), id: String(el.id) }, cookie: viewer });
    expect(r.status).toBe(404);
  });
});

describe("access to the element routes", () => {
  it("a viewer can GET the list and one element, and gets 403 on POST, PATCH, DELETE and preview", async () => {
    const l = await call(list.GET, { method: "GET", path: path(), params: P(), cookie: viewer });
    expect(l.status).toBe(200);
    const id = String((l.json.elements as { id: number }[])[0].id);
    expect((await call(one.GET, { method: "GET", path: `${path()}/${id}`, params: { ...P(), id }, cookie: viewer })).status).toBe(200);
    expect((await call(list.POST, { method: "POST", path: path(), params: P(), cookie: viewer, body: { name: "v", kind: "baseline", points: ["A", "C"] } })).status).toBe(403);
    expect((await call(one.PATCH, { method: "PATCH", path: `${path()}/${id}`, params: { ...P(), id }, cookie: viewer, body: { label: "x" } })).status).toBe(403);
    expect((await call(one.DELETE, { method: "DELETE", path: `${path()}/${id}`, params: { ...P(), id }, cookie: viewer })).status).toBe(403);
    expect((await call(preview.POST, { method: "POST", path: `${path()}/preview-triangulation`, params: P(), cookie: viewer, body: {} })).status).toBe(403);
  });
});
