import { beforeAll, describe, expect, it } from "vitest";
import * as list from "../../../app/api/v1/sites/[slug]/elements/route.ts";
import * as one from "../../../app/api/v1/sites/[slug]/elements/[id]/route.ts";
import * as fieldRoute from "../../../app/api/v1/sites/[slug]/field/route.ts";
import { getStrainField } from "../../../lib/server/dashboard/field.ts";
import { getSiteHeader } from "../../../lib/server/dashboard/site.ts";
import { unpackField, type PackedField, type StrainField } from "../../../lib/plan/field.ts";
import { addEpochs, call, hoursAfter, makeSite, sessionFor, type EpochSpec } from "../elements/fixtures.ts";

// Three points; epoch k moves B k mm east, so baseline A-B (10 m) has engineering strain k·1e-4 against epoch 0 (hand-computed).
const PLAN = { A: { east: 0, north: 0 }, B: { east: 10, north: 0 }, C: { east: 5, north: 8.66 } };
const T0 = "2026-03-01T00:00:00.000Z";
const epochs = (n: number): EpochSpec[] => Array.from({ length: n }, (_, k) => ({ time: hoursAfter(T0, 6 * k), points: { ...PLAN, B: { east: 10 + 0.001 * k, north: 0 } } }));

let site: Awaited<ReturnType<typeof makeSite>>;
let epochIds: number[];
let viewer: string;
const ids: Record<"ab" | "abRebased" | "abc" | "off", number> = { ab: 0, abRebased: 0, abc: 0, off: 0 };

async function field(query: Record<string, number>): Promise<{ status: number; field: StrainField | null }> {
  const r = await call(fieldRoute.GET, { method: "GET", path: `/api/v1/sites/${site.slug}/field`, params: { slug: site.slug }, cookie: viewer, query });
  return { status: r.status, field: r.status === 200 ? unpackField(r.json as unknown as PackedField) : null };
}
const byId = (f: StrainField, id: number) => f.elements.find((e) => e.id === id);

beforeAll(async () => {
  site = await makeSite({ points: Object.keys(PLAN) });
  epochIds = await addEpochs(site, epochs(6));
  const engineer = await sessionFor(site.id, "engineer");
  viewer = await sessionFor(site.id, "viewer");
  const path = `/api/v1/sites/${site.slug}/elements`;
  const make = async (body: Record<string, unknown>) => ((await call(list.POST, { method: "POST", path, params: { slug: site.slug }, cookie: engineer, body })).json.element as { id: number }).id;
  ids.ab = await make({ name: "AB", kind: "baseline", points: ["A", "B"] });
  ids.abRebased = await make({ name: "AB from epoch 2", kind: "baseline", points: ["A", "B"] });
  ids.abc = await make({ name: "ABC", kind: "triangle", points: ["A", "B", "C"] });
  ids.off = await make({ name: "AB disabled", kind: "baseline", points: ["A", "B"] });
  await call(one.PATCH, { method: "PATCH", path: `${path}/${ids.abRebased}`, params: { slug: site.slug, id: String(ids.abRebased) }, cookie: engineer, body: { referenceEpochId: epochIds[2] } });
  await call(one.DELETE, { method: "DELETE", path: `${path}/${ids.off}`, params: { slug: site.slug, id: String(ids.off) }, cookie: engineer });
});

describe("GET /api/v1/sites/{slug}/field (cumulative: stored results in one query)", () => {
  it("gives each enabled element its stored result at the epoch against its own reference, and leaves out disabled elements", async () => {
    const { status, field: f } = await field({ epoch: epochIds[5] });
    expect(status).toBe(200);
    expect(f!.mode).toBe("cumulative");
    expect(f!.elements.map((e) => e.id).sort((a, b) => a - b)).toEqual([ids.ab, ids.abRebased, ids.abc].sort((a, b) => a - b));
    // B at +5 mm over 10 m against epoch 0; against epoch 2 (B at +2 mm) 3 mm over 10.002 m (hand-computed).
    expect(byId(f!, ids.ab)!.engineering).toBeCloseTo(5e-4, 9);
    expect(byId(f!, ids.abRebased)!.engineering).toBeCloseTo(0.003 / 10.002, 9);
    expect(byId(f!, ids.abc)!.greenMax).not.toBeNull();
    // Displacement of B against the site's reference epoch: 5 mm east.
    expect(f!.points.find((p) => p.code === "B")!.dE).toBeCloseTo(0.005, 6);
  });

  it("the page's call with the reference epoch from the site header gives the same field as the route's call without it", async () => {
    const header = await getSiteHeader(site.id);
    expect(header!.reference!.id).toBe(epochIds[0]);
    const a = await getStrainField(site.id, { epochId: epochIds[4] });
    const b = await getStrainField(site.id, { epochId: epochIds[4] }, { siteReferenceEpochId: header!.reference!.id });
    const sort = (f: StrainField) => ({ ...f, elements: [...f.elements].sort((x, y) => x.id - y.id), points: [...f.points].sort((x, y) => x.code.localeCompare(y.code)) });
    expect(sort(b)).toEqual(sort(a));
  });

  it("answers 404 for an epoch of another site", async () => {
    const other = await makeSite({ points: ["A", "B"] });
    const [foreign] = await addEpochs(other, [{ time: T0, points: { A: PLAN.A, B: PLAN.B } }]);
    expect((await field({ epoch: foreign })).status).toBe(404);
  });
});

describe("GET /api/v1/sites/{slug}/field?from= (increment: recomputed between two epochs)", () => {
  it("gives the strain between the two epochs, 3 mm over 10.002 m from epoch 2 to epoch 5", async () => {
    const { field: f } = await field({ epoch: epochIds[5], from: epochIds[2] });
    expect(f!.mode).toBe("increment");
    expect(byId(f!, ids.ab)!.engineering).toBeCloseTo(0.003 / 10.002, 6);
    expect(f!.elements.some((e) => e.id === ids.off)).toBe(false);
  });
});
