/**
 * Read model of one site for the dashboard header and plan: the reference epoch, the epochs (for the
 * scrubber), the points at their reference position and the enabled elements.
 */
import "server-only";
import { getDb } from "../db/client.ts";
import { intList } from "./sql.ts";

export interface EpochRef {
  id: number;
  timeMs: number;
}

export interface SiteHeader {
  id: number;
  slug: string;
  name: string;
  timeZone: string;
  frameDescription: string;
  sigmaHM: number;
  reference: EpochRef | null;
  latest: EpochRef | null;
  epochCount: number;
}

/** The site's reference epoch id: Site.referenceEpochId, else its first current epoch by time, else null. */
export async function referenceEpochIdOf(siteId: number, explicit: number | null): Promise<number | null> {
  if (explicit) return explicit;
  const first = await getDb().epoch.findFirst({ where: { siteId, isCurrent: true }, orderBy: [{ time: "asc" }, { id: "asc" }], select: { id: true } });
  return first?.id ?? null;
}

export async function getSiteHeader(siteId: number): Promise<SiteHeader | null> {
  const db = getDb();
  const site = await db.site.findUnique({ where: { id: siteId } });
  if (!site) return null;
  const current = { siteId, isCurrent: true };
  const epochRef = { id: true, time: true } as const;
  // The reference as referenceEpochIdOf chooses it (explicit, else the first current epoch), read in the same round trip as the rest.
  const [ref, latest, epochCount] = await Promise.all([
    site.referenceEpochId
      ? db.epoch.findUnique({ where: { id: site.referenceEpochId }, select: epochRef })
      : db.epoch.findFirst({ where: current, orderBy: [{ time: "asc" }, { id: "asc" }], select: epochRef }),
    db.epoch.findFirst({ where: current, orderBy: [{ time: "desc" }, { id: "desc" }], select: epochRef }),
    db.epoch.count({ where: current }),
  ]);
  return {
    id: site.id,
    slug: site.slug,
    name: site.name,
    timeZone: site.timeZone,
    frameDescription: site.frameDescription,
    sigmaHM: site.sigmaHM,
    reference: ref ? { id: ref.id, timeMs: ref.time.getTime() } : null,
    latest: latest ? { id: latest.id, timeMs: latest.time.getTime() } : null,
    epochCount,
  };
}

/** Every current epoch of the site, oldest first, as two parallel arrays (compact for the scrubber). */
export async function listEpochs(siteId: number): Promise<{ ids: number[]; timesMs: number[] }> {
  const rows = await getDb().$queryRawUnsafe<{ id: number; t: number }[]>(
    `SELECT id, (extract(epoch from "time") * 1000)::float8 AS t FROM "Epoch" WHERE "siteId" = $1 AND "isCurrent" ORDER BY "time", id`,
    siteId,
  );
  return { ids: rows.map((r) => r.id), timesMs: rows.map((r) => Number(r.t)) };
}

export interface PlanPoint {
  code: string;
  east: number;
  north: number;
  height: number;
  isReference: boolean;
  group: string | null;
  kind: string;
  /** Whether the position comes from the reference epoch (else: the point's latest observation). */
  atReference: boolean;
}

export interface PlanElement {
  id: number;
  name: string;
  label: string;
  kind: string;
  mode: string;
  pointCodes: string[];
  referenceEpochId: number | null;
}

/**
 * Points at their reference-epoch position (points absent from the reference: their latest
 * observation; never observed: left out) and the site's enabled elements.
 */
export async function getPlanGeometry(siteId: number, referenceEpochId: number | null): Promise<{ points: PlanPoint[]; elements: PlanElement[] }> {
  const db = getDb();
  const [pts, elements, obs] = await Promise.all([
    db.point.findMany({ where: { siteId }, select: { id: true, code: true, isReference: true, group: true, kind: true }, orderBy: { code: "asc" } }),
    db.element.findMany({ where: { siteId, disabledAt: null }, select: { id: true, name: true, label: true, kind: true, mode: true, pointCodes: true, referenceEpochId: true }, orderBy: { name: "asc" } }),
    referenceEpochId ? db.observation.findMany({ where: { epochId: referenceEpochId }, select: { pointId: true, east: true, north: true, height: true } }) : Promise.resolve([]),
  ]);
  const pos = new Map<number, { east: number; north: number; height: number; atReference: boolean }>();
  for (const o of obs) pos.set(o.pointId, { east: o.east, north: o.north, height: o.height, atReference: true });
  const missing = pts.filter((p) => !pos.has(p.id)).map((p) => p.id);
  if (missing.length) {
    const rows = await db.$queryRawUnsafe<{ pointId: number; east: number; north: number; height: number }[]>(
      `SELECT p.id AS "pointId", o.east, o.north, o.height
         FROM unnest($1::int[]) AS p(id)
         CROSS JOIN LATERAL (
           SELECT ob.east, ob.north, ob.height FROM "Observation" ob JOIN "Epoch" e ON e.id = ob."epochId"
            WHERE ob."pointId" = p.id AND e."isCurrent" ORDER BY e."time" DESC LIMIT 1) o`,
      intList(missing),
    );
    for (const r of rows) pos.set(r.pointId, { east: r.east, north: r.north, height: r.height, atReference: false });
  }
  const points: PlanPoint[] = [];
  for (const p of pts) {
    const q = pos.get(p.id);
    if (q) points.push({ code: p.code, isReference: p.isReference, group: p.group, kind: p.kind, ...q });
  }
  return { points, elements };
}
