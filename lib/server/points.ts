/**
 * Survey points of a site as the set-up pages edit them: stable reference points, groups, kind, σ
 * overrides (metres; null = the site's default) and a note. Every change is one transaction with its
 * audit row (recordAudit, action "point.update"). Codes and observations are never changed here.
 */
import { getDb, type Db } from "./db/client.ts";
import { AppError } from "./errors.ts";
import { recordAudit } from "./audit.ts";
import type { Actor, SiteRow } from "./http/route.ts";
import type { PointPatch } from "./dashboard/schemas.ts";

export interface PointView {
  code: string;
  kind: string;
  group: string | null;
  isReference: boolean;
  sigmaHM: number | null;
  sigmaVM: number | null;
  note: string | null;
  observations: number;
}

type PointRow = { id: number; code: string; kind: string; group: string | null; isReference: boolean; sigmaHM: number | null; sigmaVM: number | null; note: string | null };

function view(p: PointRow, observations: number): PointView {
  return { code: p.code, kind: p.kind, group: p.group, isReference: p.isReference, sigmaHM: p.sigmaHM, sigmaVM: p.sigmaVM, note: p.note, observations };
}

/** Every point of the site, by code, with its number of observations. */
export async function listSitePoints(siteId: number, db: Db = getDb()): Promise<PointView[]> {
  const [points, counts] = await Promise.all([
    db.point.findMany({ where: { siteId }, orderBy: { code: "asc" } }),
    db.observation.groupBy({ by: ["pointId"], where: { point: { siteId } }, _count: { _all: true } }),
  ]);
  const n = new Map(counts.map((c) => [c.pointId, c._count._all]));
  return points.map((p) => view(p, n.get(p.id) ?? 0));
}

/** Applies a patch to one point; 404 for an unknown code. Returns the point as it is now. */
export async function updatePoint(site: Pick<SiteRow, "id" | "slug">, code: string, patch: PointPatch, actor: Pick<Actor, "label">, db: Db = getDb()): Promise<PointView> {
  const data: Partial<Omit<PointRow, "id" | "code">> = {};
  if (patch.isReference !== undefined) data.isReference = patch.isReference;
  if (patch.group !== undefined) data.group = patch.group === null || patch.group === "" ? null : patch.group;
  if (patch.kind !== undefined) data.kind = patch.kind;
  if (patch.sigmaHM !== undefined) data.sigmaHM = patch.sigmaHM;
  if (patch.sigmaVM !== undefined) data.sigmaVM = patch.sigmaVM;
  if (patch.note !== undefined) data.note = patch.note === null || patch.note === "" ? null : patch.note;
  const updated = await db.$transaction(async (tx) => {
    const before = await tx.point.findUnique({ where: { siteId_code: { siteId: site.id, code } } });
    if (!before) throw new AppError("not_found", `No point "${code}" on site "${site.slug}".`);
    if (Object.keys(data).length === 0) return before;
    const after = await tx.point.update({ where: { id: before.id }, data });
    await recordAudit(tx, { actor: actor.label, siteId: site.id, action: "point.update", entityType: "Point", entityId: String(before.id), before, after });
    return after;
  });
  const observations = await db.observation.count({ where: { pointId: updated.id } });
  return view(updated, observations);
}
