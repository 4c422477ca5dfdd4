/** The point ids of an ingest request: known ones from memory, unknown ones registered or refused. */
import { AppError, type FieldError } from "../errors.ts";
import type { EpochInput } from "../../formats/epoch-json.ts";
import { currentDatabaseKey, type Sql } from "./pg-tx.ts";
import { textArray } from "./sql-arrays.ts";

/**
 * Point ids per database and site, as last read, with the Site.pointsStamp they were read under
 * (database triggers change the stamp on any insert, update or delete of the site's points, by any
 * writer: migration site_cache_stamps). Ids are only ever used under the site's ingest lock after
 * the stamp has been read there, so a cached id is one the database holds. Never mutated: a request
 * that registers points changes the stamp, and the next request reads the ids again.
 */
type PointIds = { stamp: string; ids: ReadonlyMap<string, number> };
const POINT_IDS_KEY = Symbol.for("epochal.ingest.pointIds");
const POINT_IDS_SITES = 64;
type PointIdsHolder = { [POINT_IDS_KEY]?: Map<string, PointIds> };

function pointIdCache(): Map<string, PointIds> {
  const h = globalThis as PointIdsHolder;
  h[POINT_IDS_KEY] ??= new Map();
  return h[POINT_IDS_KEY];
}

async function sitePointIds(tx: Sql, siteId: number, stamp: string): Promise<ReadonlyMap<string, number>> {
  const key = `${currentDatabaseKey()}#${siteId}`;
  const c = pointIdCache();
  const hit = c.get(key);
  if (hit && hit.stamp === stamp) return hit.ids;
  const rows = await tx.query<{ id: number; code: string }>(`SELECT id, code FROM "Point" WHERE "siteId" = $1`, [siteId]);
  const ids = new Map(rows.map((r) => [r.code, r.id]));
  c.delete(key);
  c.set(key, { stamp, ids });
  if (c.size > POINT_IDS_SITES) c.delete(c.keys().next().value as string);
  return ids;
}

/**
 * The id of every point code of the request, in a map of its own (the cached map is never changed).
 * Codes the site does not know are registered, in order of first appearance (`newPoints`), or, when
 * the site refuses unknown points, answered 422 naming each one's first line and field.
 */
export async function resolvePointIds(
  tx: Sql,
  siteId: number,
  site: { pointsStamp: string; refuseUnknownPoints: boolean },
  input: readonly EpochInput[],
): Promise<{ pointId: Map<string, number>; newPoints: string[] }> {
  const firstUse = new Map<string, { epoch: EpochInput; index: number }>();
  for (const ep of input) ep.observations.forEach((o, i) => firstUse.has(o.point) || firstUse.set(o.point, { epoch: ep, index: i }));
  const pointId = new Map<string, number>();
  const siteIds = await sitePointIds(tx, siteId, site.pointsStamp);
  const unknown: string[] = [];
  for (const c of firstUse.keys()) {
    const id = siteIds.get(c);
    if (id === undefined) unknown.push(c);
    else pointId.set(c, id);
  }
  if (unknown.length > 0 && site.refuseUnknownPoints) {
    const errors: FieldError[] = unknown.slice(0, 100).map((c) => {
      const u = firstUse.get(c) as { epoch: EpochInput; index: number };
      return { line: u.epoch.observations[u.index].line, field: u.epoch.fieldOf(u.index, "point"), message: `unknown point ${JSON.stringify(c)}: this site accepts only registered points` };
    });
    throw new AppError("invalid", "The input names points this site does not know; nothing was stored.", { errors });
  }
  if (unknown.length > 0) {
    await tx.query(`INSERT INTO "Point" ("siteId", code) SELECT $1, c FROM unnest($2::text[]) AS c ON CONFLICT ("siteId", code) DO NOTHING`, [siteId, textArray(unknown)]);
    const added = await tx.query<{ id: number; code: string }>(`SELECT id, code FROM "Point" WHERE "siteId" = $1 AND code = ANY($2::text[])`, [siteId, textArray(unknown)]);
    for (const p of added) pointId.set(p.code, p.id);
  }
  return { pointId, newPoints: unknown };
}
