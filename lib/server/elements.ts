/**
 * Elements of a site: made by hand or from the plan triangulation of the points, named, labelled with
 * what they span, with an optional reference epoch of their own. Every change is one transaction with
 * its audit row; the results history is computed after the element is stored (creation: every current
 * epoch; re-baselining: every epoch since the new reference, keeping the rows against the old one).
 * Observations are never written here. Deleting an element disables it; its results stay.
 */
// No "server-only" marker: the benchmark and the CLI import this module outside Next.js too.
import type { Db } from "./db/client.ts";
import type { Actor, SiteRow } from "./http/route.ts";
import { AppError } from "./errors.ts";
import { Prisma } from "./db/generated/client.ts";
import { recordAudit } from "./audit.ts";
import { triangulatePlan, DEFAULT_MIN_ANGLE_DEG, type PlanTriangle, type DroppedTriangle } from "../network/triangulate.ts";
import { computeElementHistory, effectiveReferenceEpochId } from "./results/element-history.ts";
import type { ElementManualInput, ElementPatchInput, TriangulationOptions } from "./schemas/elements.ts";

export interface ElementView {
  id: number;
  name: string;
  label: string;
  kind: string;
  mode: string;
  points: string[];
  source: string;
  minAngleDeg: number | null;
  /** The element's own reference epoch, or null when it follows the site's. */
  referenceEpochId: number | null;
  /** The reference its results are computed against now (own, else the site's, else the first epoch). */
  effectiveReferenceEpochId: number | null;
  disabled: boolean;
  disabledAt: string | null;
  createdAt: string;
}

type ElementRow = {
  id: number;
  siteId: number;
  name: string;
  label: string;
  kind: string;
  mode: string;
  pointCodes: string[];
  referenceEpochId: number | null;
  source: string;
  minAngleDeg: number | null;
  disabledAt: Date | null;
  createdAt: Date;
};

function view(el: ElementRow, effective: number | null): ElementView {
  return {
    id: el.id,
    name: el.name,
    label: el.label,
    kind: el.kind,
    mode: el.mode,
    points: el.pointCodes,
    source: el.source,
    minAngleDeg: el.minAngleDeg,
    referenceEpochId: el.referenceEpochId,
    effectiveReferenceEpochId: effective,
    disabled: el.disabledAt !== null,
    disabledAt: el.disabledAt?.toISOString() ?? null,
    createdAt: el.createdAt.toISOString(),
  };
}

const invalid = (field: string, message: string): AppError => new AppError("invalid", `${field}: ${message}`, { errors: [{ line: null, field, message }] });

async function siteDefaultReference(db: Db, siteId: number): Promise<number | null> {
  return effectiveReferenceEpochId(db, { siteId, referenceEpochId: null });
}

export async function listElements(db: Db, site: SiteRow, opts: { includeDisabled?: boolean } = {}): Promise<ElementView[]> {
  const rows = await db.element.findMany({ where: { siteId: site.id, ...(opts.includeDisabled ? {} : { disabledAt: null }) }, orderBy: { name: "asc" } });
  const siteRef = await siteDefaultReference(db, site.id);
  return rows.map((r) => view(r, r.referenceEpochId ?? siteRef));
}

export async function getElementRow(db: Db, site: SiteRow, id: number): Promise<ElementRow> {
  const el = await db.element.findFirst({ where: { id, siteId: site.id } });
  if (!el) throw new AppError("not_found", `No element ${id} on site "${site.slug}".`);
  return el;
}

export async function getElement(db: Db, site: SiteRow, id: number): Promise<ElementView> {
  const el = await getElementRow(db, site, id);
  return view(el, await effectiveReferenceEpochId(db, el));
}

async function assertPointsExist(db: Db, siteId: number, codes: readonly string[]): Promise<void> {
  const found = await db.point.findMany({ where: { siteId, code: { in: [...codes] } }, select: { code: true } });
  const have = new Set(found.map((p) => p.code));
  const missing = codes.filter((c) => !have.has(c));
  if (missing.length) throw invalid("points", `no point ${missing.join(", ")} on this site`);
}

async function assertEpochOfSite(db: Db, siteId: number, epochId: number): Promise<void> {
  const ep = await db.epoch.findFirst({ where: { id: epochId, siteId }, select: { isCurrent: true } });
  if (!ep) throw invalid("referenceEpochId", `no epoch ${epochId} on this site`);
  if (!ep.isCurrent) throw invalid("referenceEpochId", `epoch ${epochId} has been superseded by a newer revision`);
}

async function assertNameFree(db: Db, siteId: number, name: string, exceptId?: number): Promise<void> {
  const other = await db.element.findFirst({ where: { siteId, name, ...(exceptId ? { id: { not: exceptId } } : {}) }, select: { id: true } });
  if (other) throw new AppError("conflict", `name: an element named "${name}" already exists on this site`, { errors: [{ line: null, field: "name", message: `an element named "${name}" already exists on this site` }] });
}

/** A concurrent request took the name between the check and the insert: the same 409 as the check. */
function nameRace(err: unknown, name: string): never {
  if (err instanceof Prisma.PrismaClientKnownRequestError && err.code === "P2002")
    throw new AppError("conflict", `name: an element named "${name}" already exists on this site`, { errors: [{ line: null, field: "name", message: `an element named "${name}" already exists on this site` }] });
  throw err;
}

/** Creates one element by hand and computes its results at every current epoch. */
export async function createElement(db: Db, site: SiteRow, actor: Actor, input: ElementManualInput): Promise<{ element: ElementView; resultsWritten: number }> {
  await assertPointsExist(db, site.id, input.points);
  if (input.referenceEpochId) await assertEpochOfSite(db, site.id, input.referenceEpochId);
  await assertNameFree(db, site.id, input.name);
  const el = await db.$transaction(async (tx) => {
    const created = await tx.element.create({
      data: { siteId: site.id, name: input.name, label: input.label ?? "", kind: input.kind, mode: input.mode, pointCodes: input.points, referenceEpochId: input.referenceEpochId ?? null, source: "manual" },
    });
    await recordAudit(tx, { actor: actor.label, siteId: site.id, action: "element.create", entityType: "element", entityId: String(created.id), after: created });
    return created;
  }).catch((e: unknown) => nameRace(e, input.name));
  const ref = await effectiveReferenceEpochId(db, el);
  const resultsWritten = ref === null ? 0 : await computeElementHistory(db, el, ref);
  return { element: view(el, ref), resultsWritten };
}

export interface TriangulationPreview {
  referenceEpochId: number;
  minAngleDeg: number;
  maxEdgeM: number | null;
  triangles: (PlanTriangle & { name: string; exists: boolean })[];
  dropped: DroppedTriangle[];
  skippedPoints: { code: string; reason: string }[];
  /** Quality: the smallest interior angle over the kept triangles, and their mean. */
  quality: { minAngleDeg: number | null; meanMinAngleDeg: number | null };
}

/** The plan triangulation of the site's points at its reference epoch; writes nothing. */
export async function previewTriangulation(db: Db, site: SiteRow, opts: TriangulationOptions): Promise<TriangulationPreview> {
  const refId = await siteDefaultReference(db, site.id);
  if (refId === null) throw new AppError("conflict", "The site has no epoch yet: upload one before triangulating.");
  const rows = await db.observation.findMany({
    where: { epochId: refId, point: { siteId: site.id, ...(opts.pointGroup ? { group: opts.pointGroup } : {}) } },
    select: { east: true, north: true, point: { select: { code: true } } },
  });
  const tri = triangulatePlan(
    rows.map((r) => ({ code: r.point.code, east: r.east, north: r.north })),
    { minAngleDeg: opts.minAngleDeg, maxEdgeM: opts.maxEdgeM },
  );
  if (tri.status !== "ok") throw invalid("generate", tri.message);
  const prefix = opts.namePrefix ?? "";
  const names = tri.triangles.map((t) => prefix + t.id);
  const existing = new Set((await db.element.findMany({ where: { siteId: site.id, name: { in: names } }, select: { name: true } })).map((e) => e.name));
  const mins = tri.triangles.map((t) => t.minAngleDeg);
  return {
    referenceEpochId: refId,
    minAngleDeg: opts.minAngleDeg ?? DEFAULT_MIN_ANGLE_DEG,
    maxEdgeM: opts.maxEdgeM ?? null,
    triangles: tri.triangles.map((t) => ({ ...t, name: prefix + t.id, exists: existing.has(prefix + t.id) })),
    dropped: tri.dropped,
    skippedPoints: tri.skippedPoints,
    quality: { minAngleDeg: mins.length ? Math.min(...mins) : null, meanMinAngleDeg: mins.length ? mins.reduce((a, b) => a + b, 0) / mins.length : null },
  };
}

/**
 * Saves the triangulation's triangles as plan elements (source "triangulation"). Triangles whose name
 * is already taken are skipped and listed, so generating twice creates nothing the second time.
 */
export async function generateElements(
  db: Db,
  site: SiteRow,
  actor: Actor,
  opts: TriangulationOptions,
): Promise<{ created: ElementView[]; skipped: string[]; preview: TriangulationPreview; resultsWritten: number }> {
  const preview = await previewTriangulation(db, site, opts);
  const todo = preview.triangles.filter((t) => !t.exists);
  const created = await db.$transaction(async (tx) => {
    const out: ElementRow[] = [];
    for (const t of todo) {
      const el = await tx.element.create({
        data: { siteId: site.id, name: t.name, label: "", kind: "triangle", mode: "plan", pointCodes: [...t.codes], source: "triangulation", minAngleDeg: t.minAngleDeg },
      });
      await recordAudit(tx, {
        actor: actor.label,
        siteId: site.id,
        action: "element.create",
        entityType: "element",
        entityId: String(el.id),
        after: { ...el, triangulation: { minAngleDeg: preview.minAngleDeg, maxEdgeM: preview.maxEdgeM, pointGroup: opts.pointGroup ?? null } },
      });
      out.push(el);
    }
    return out;
  }).catch((e: unknown) => nameRace(e, "(one of the generated triangles, made by a concurrent request)"));
  let resultsWritten = 0;
  for (const el of created) resultsWritten += await computeElementHistory(db, el, preview.referenceEpochId);
  return { created: created.map((el) => view(el, preview.referenceEpochId)), skipped: preview.triangles.filter((t) => t.exists).map((t) => t.name), preview, resultsWritten };
}

/** Renames, relabels, re-baselines (computing the new reference's rows, keeping the old ones), disables or enables. */
export async function updateElement(db: Db, site: SiteRow, actor: Actor, id: number, patch: ElementPatchInput): Promise<{ element: ElementView; resultsWritten: number }> {
  const before = await getElementRow(db, site, id);
  if (patch.name !== undefined && patch.name !== before.name) await assertNameFree(db, site.id, patch.name, id);
  if (patch.referenceEpochId) await assertEpochOfSite(db, site.id, patch.referenceEpochId);
  const rebaseline = patch.referenceEpochId !== undefined && patch.referenceEpochId !== before.referenceEpochId;
  const after = await db.$transaction(async (tx) => {
    const el = await tx.element.update({
      where: { id },
      data: {
        ...(patch.name !== undefined ? { name: patch.name } : {}),
        ...(patch.label !== undefined ? { label: patch.label } : {}),
        ...(patch.referenceEpochId !== undefined ? { referenceEpochId: patch.referenceEpochId } : {}),
        ...(patch.disabled !== undefined ? { disabledAt: patch.disabled ? (before.disabledAt ?? new Date()) : null } : {}),
      },
    });
    const action = rebaseline ? "element.rebaseline" : patch.disabled === true && !before.disabledAt ? "element.disable" : patch.disabled === false && before.disabledAt ? "element.enable" : "element.update";
    await recordAudit(tx, { actor: actor.label, siteId: site.id, action, entityType: "element", entityId: String(id), before, after: el });
    return el;
  }).catch((e: unknown) => nameRace(e, patch.name ?? before.name));
  const ref = await effectiveReferenceEpochId(db, after);
  // A re-baselined element (or one enabled again) gets every epoch since its reference against it.
  const needsHistory = (rebaseline || (patch.disabled === false && before.disabledAt !== null)) && ref !== null;
  const resultsWritten = needsHistory ? await computeElementHistory(db, after, ref) : 0;
  return { element: view(after, ref), resultsWritten };
}

/** DELETE: disables the element; its results and alerts stay. */
export async function disableElement(db: Db, site: SiteRow, actor: Actor, id: number): Promise<ElementView> {
  return (await updateElement(db, site, actor, id, { disabled: true })).element;
}

export function parseElementId(raw: string): number {
  const id = Number(raw);
  if (!Number.isSafeInteger(id) || id <= 0) throw new AppError("not_found", `No element "${raw}".`);
  return id;
}
