/**
 * Sites overview: for each site the user may read, the latest epoch, how many points it reported,
 * open alerts by level, and the largest major principal strain (greenMax) at that epoch with its σ.
 */
import "server-only";
import { getDb } from "../db/client.ts";
import { alertsSettled } from "../alerts/pending.ts";
import { intList } from "./sql.ts";
import { referenceEpochIdOf } from "./site.ts";

export const ALERT_LEVELS = ["review", "alert", "limit"] as const;
export type AlertLevel = (typeof ALERT_LEVELS)[number];

export interface SiteOverview {
  id: number;
  slug: string;
  name: string;
  timeZone: string;
  role: string;
  latest: { id: number; timeMs: number; pointsReported: number } | null;
  pointCount: number;
  elementCount: number;
  openAlerts: Record<AlertLevel, number>;
  largest: { elementId: number; elementName: string; greenMax: number; sigma: number | null } | null;
}

/** Sites the user holds a role on (every site for a global administrator), by name. */
export async function listUserSites(user: { userId: number; isAdmin: boolean }): Promise<{ id: number; slug: string; name: string; timeZone: string; role: string }[]> {
  const db = getDb();
  if (user.isAdmin) {
    const sites = await db.site.findMany({ orderBy: { name: "asc" }, select: { id: true, slug: true, name: true, timeZone: true } });
    return sites.map((s) => ({ ...s, role: "admin" }));
  }
  const ms = await db.membership.findMany({ where: { userId: user.userId }, include: { site: { select: { id: true, slug: true, name: true, timeZone: true } } } });
  return ms.map((m) => ({ ...m.site, role: m.role })).sort((a, b) => a.name.localeCompare(b.name));
}

export async function getSitesOverview(user: { userId: number; isAdmin: boolean }): Promise<SiteOverview[]> {
  const db = getDb();
  const sites = await listUserSites(user);
  if (sites.length === 0) return [];
  const ids = sites.map((s) => s.id);
  await alertsSettled(ids);
  const [alertGroups, pointCounts, elementCounts, siteRows] = await Promise.all([
    db.alert.groupBy({ by: ["siteId", "level"], where: { siteId: { in: ids }, clearedAt: null }, _count: { _all: true } }),
    db.point.groupBy({ by: ["siteId"], where: { siteId: { in: ids } }, _count: { _all: true } }),
    db.element.groupBy({ by: ["siteId"], where: { siteId: { in: ids }, disabledAt: null }, _count: { _all: true } }),
    db.site.findMany({ where: { id: { in: ids } }, select: { id: true, referenceEpochId: true } }),
  ]);
  const refOf = new Map(siteRows.map((s) => [s.id, s.referenceEpochId]));
  return Promise.all(
    sites.map(async (s): Promise<SiteOverview> => {
      const open: Record<AlertLevel, number> = { review: 0, alert: 0, limit: 0 };
      for (const g of alertGroups) if (g.siteId === s.id && (ALERT_LEVELS as readonly string[]).includes(g.level)) open[g.level as AlertLevel] += g._count._all;
      const latest = await db.epoch.findFirst({ where: { siteId: s.id, isCurrent: true }, orderBy: [{ time: "desc" }, { id: "desc" }], select: { id: true, time: true } });
      let latestInfo: SiteOverview["latest"] = null;
      let largest: SiteOverview["largest"] = null;
      if (latest) {
        const siteRef = await referenceEpochIdOf(s.id, refOf.get(s.id) ?? null);
        const [reported, top] = await Promise.all([
          db.observation.count({ where: { epochId: latest.id } }),
          largestGreenMax(s.id, latest.id, siteRef),
        ]);
        latestInfo = { id: latest.id, timeMs: latest.time.getTime(), pointsReported: reported };
        largest = top;
      }
      return {
        ...s,
        latest: latestInfo,
        pointCount: pointCounts.find((p) => p.siteId === s.id)?._count._all ?? 0,
        elementCount: elementCounts.find((p) => p.siteId === s.id)?._count._all ?? 0,
        openAlerts: open,
        largest,
      };
    }),
  );
}

/** The element with the largest greenMax at an epoch (each element against its own reference). */
async function largestGreenMax(siteId: number, epochId: number, siteRef: number | null): Promise<SiteOverview["largest"]> {
  const db = getDb();
  const els = await db.element.findMany({ where: { siteId, disabledAt: null }, select: { id: true, name: true, referenceEpochId: true } });
  const pairs = els.map((e) => ({ id: e.id, ref: e.referenceEpochId ?? siteRef })).filter((p): p is { id: number; ref: number } => p.ref !== null);
  if (pairs.length === 0) return null;
  const rows = await db.$queryRawUnsafe<{ elementId: number; greenMax: number; sigma: number | null }[]>(
    `SELECT r."elementId", r."greenMax", r."sigmaGreenMax" AS sigma
       FROM unnest($1::int[], $2::int[]) AS k(eid, rid)
       JOIN "ElementResult" r ON r."elementId" = k.eid AND r."referenceEpochId" = k.rid
        AND r."time" = (SELECT e."time" FROM "Epoch" e WHERE e.id = $3) AND r."epochId" = $3
      WHERE r."greenMax" IS NOT NULL ORDER BY r."greenMax" DESC LIMIT 1`,
    intList(pairs.map((p) => p.id)),
    intList(pairs.map((p) => p.ref)),
    epochId,
  );
  const r = rows[0];
  if (!r) return null;
  return { elementId: r.elementId, elementName: els.find((e) => e.id === r.elementId)?.name ?? String(r.elementId), greenMax: r.greenMax, sigma: r.sigma };
}
