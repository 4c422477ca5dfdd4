/**
 * Reading back what ingest stored: epochs by time range with keyset paging, and each point's
 * latest displacement from the reference epoch.
 */
import { getDb, type Db } from "../db/client.ts";
import { AppError } from "../errors.ts";
import { EPOCH_PAGE_DEFAULT, EPOCH_PAGE_MAX_WITH_OBSERVATIONS, type EpochListQuery } from "../schemas/ingest.ts";
import { siteReferenceEpochId } from "../results/compute.ts";
import { intArray } from "./sql-arrays.ts";

export interface ObservationJson {
  point: string;
  east: number;
  north: number;
  height: number;
  sigma_east: number;
  sigma_north: number;
  sigma_height: number;
}
export interface EpochJson {
  id: number;
  time: string;
  revision: number;
  isCurrent: boolean;
  source: string;
  contentHash: string;
  createdAt: string;
  createdBy: string | null;
  observationCount: number;
  observations?: ObservationJson[];
}

/** Cursor: the (time, id) of the last epoch of the previous page, base64url JSON. */
function encodeCursor(timeMs: number, id: number): string {
  return Buffer.from(JSON.stringify([timeMs, id])).toString("base64url");
}
function decodeCursor(c: string): { timeMs: number; id: number } {
  try {
    const v = JSON.parse(Buffer.from(c, "base64url").toString("utf8")) as unknown;
    if (Array.isArray(v) && v.length === 2 && Number.isSafeInteger(v[0]) && Number.isSafeInteger(v[1])) return { timeMs: v[0] as number, id: v[1] as number };
  } catch {
    /* fall through */
  }
  throw new AppError("invalid", "Bad cursor.", { errors: [{ line: null, field: "cursor", message: "cursor is not one this server gave out" }] });
}

/** Epochs in time order (then id), current revisions unless `revisions=all`, with a cursor to the next page. */
export async function listEpochs(siteId: number, q: EpochListQuery, db: Db = getDb()): Promise<{ epochs: EpochJson[]; nextCursor: string | null }> {
  const withObs = q.observations ?? true;
  const limit = q.limit ?? EPOCH_PAGE_DEFAULT;
  if (withObs && limit > EPOCH_PAGE_MAX_WITH_OBSERVATIONS) {
    throw new AppError("invalid", "Page too large.", { errors: [{ line: null, field: "limit", message: `limit is at most ${EPOCH_PAGE_MAX_WITH_OBSERVATIONS} with observations; add observations=false for up to 1000 epochs per page` }] });
  }
  const cond: string[] = [`e."siteId" = $1`];
  const args: unknown[] = [siteId];
  if ((q.revisions ?? "current") === "current") cond.push(`e."isCurrent"`);
  if (q.from) {
    args.push(q.from);
    cond.push(`e.time >= $${args.length}::timestamptz`);
  }
  if (q.to) {
    args.push(q.to);
    cond.push(`e.time <= $${args.length}::timestamptz`);
  }
  if (q.cursor) {
    const c = decodeCursor(q.cursor);
    args.push(new Date(c.timeMs).toISOString(), c.id);
    cond.push(`(e.time, e.id) > ($${args.length - 1}::timestamptz, $${args.length}::int)`);
  }
  args.push(limit + 1);
  const rows = await db.$queryRawUnsafe<
    { id: number; time: Date; revision: number; isCurrent: boolean; source: string; contentHash: string; createdAt: Date; createdBy: string | null; n: number }[]
  >(
    `SELECT e.id, e.time, e.revision, e."isCurrent", e.source, e."contentHash", e."createdAt", e."createdBy",
            (SELECT count(*) FROM "Observation" o WHERE o."epochId" = e.id)::int AS n
       FROM "Epoch" e WHERE ${cond.join(" AND ")}
      ORDER BY e.time, e.id LIMIT $${args.length}`,
    ...args,
  );
  const page = rows.slice(0, limit);
  const epochs: EpochJson[] = page.map((r) => ({
    id: r.id,
    time: r.time.toISOString(),
    revision: r.revision,
    isCurrent: r.isCurrent,
    source: r.source,
    contentHash: r.contentHash,
    createdAt: r.createdAt.toISOString(),
    createdBy: r.createdBy,
    observationCount: r.n,
  }));
  if (withObs && page.length > 0) {
    const obs = await db.$queryRawUnsafe<{ epochId: number; code: string; east: number; north: number; height: number; sigmaEast: number; sigmaNorth: number; sigmaHeight: number }[]>(
      `SELECT o."epochId", p.code, o.east, o.north, o.height, o."sigmaEast", o."sigmaNorth", o."sigmaHeight"
         FROM "Observation" o JOIN "Point" p ON p.id = o."pointId"
        WHERE o."epochId" = ANY($1::int[]) ORDER BY o."epochId", p.code`,
      intArray(page.map((r) => r.id)),
    );
    const byEpoch = new Map<number, ObservationJson[]>(epochs.map((e) => [e.id, (e.observations = [])]));
    for (const o of obs) byEpoch.get(o.epochId)?.push({ point: o.code, east: o.east, north: o.north, height: o.height, sigma_east: o.sigmaEast, sigma_north: o.sigmaNorth, sigma_height: o.sigmaHeight });
  }
  const last = page[page.length - 1];
  return { epochs, nextCursor: rows.length > limit && last ? encodeCursor(last.time.getTime(), last.id) : null };
}

export interface PointJson {
  code: string;
  kind: string;
  group: string | null;
  isReference: boolean;
  /** Latest current observation and its displacement from the reference epoch (metres); null when never observed. */
  latest: {
    epochId: number;
    time: string;
    east: number;
    north: number;
    height: number;
    /** Displacement u = x − X (domain.md §2); null when the point is not in the reference epoch. */
    dE: number | null;
    dN: number | null;
    dH: number | null;
    /** √(dE² + dN²). */
    dHorizontal: number | null;
    /** √(dE² + dN² + dH²). */
    d3D: number | null;
  } | null;
}

/** Every point of the site with its latest displacement from the site's reference epoch. */
export async function listPoints(siteId: number, db: Db = getDb()): Promise<{ referenceEpoch: { id: number; time: string } | null; points: PointJson[] }> {
  const refId = await siteReferenceEpochId(db, siteId);
  const ref = refId === null ? null : await db.epoch.findUnique({ where: { id: refId }, select: { id: true, time: true } });
  const rows = await db.$queryRawUnsafe<
    { code: string; kind: string; group: string | null; isReference: boolean; epochId: number | null; time: Date | null; east: number | null; north: number | null; height: number | null; rE: number | null; rN: number | null; rH: number | null }[]
  >(
    `SELECT p.code, p.kind, p."group", p."isReference", l."epochId", l.time, l.east, l.north, l.height, r.east AS "rE", r.north AS "rN", r.height AS "rH"
       FROM "Point" p
       LEFT JOIN LATERAL (
         SELECT o."epochId", e.time, o.east, o.north, o.height
           FROM "Observation" o JOIN "Epoch" e ON e.id = o."epochId"
          WHERE o."pointId" = p.id AND e."isCurrent"
          ORDER BY e.time DESC, e.id DESC LIMIT 1) l ON true
       LEFT JOIN "Observation" r ON r."pointId" = p.id AND r."epochId" = $2
      WHERE p."siteId" = $1
      ORDER BY p.code`,
    siteId,
    refId ?? -1,
  );
  const points: PointJson[] = rows.map((r) => {
    let latest: PointJson["latest"] = null;
    if (r.epochId !== null && r.time !== null && r.east !== null && r.north !== null && r.height !== null) {
      const has = r.rE !== null && r.rN !== null && r.rH !== null;
      const dE = has ? r.east - (r.rE as number) : null;
      const dN = has ? r.north - (r.rN as number) : null;
      const dH = has ? r.height - (r.rH as number) : null;
      latest = {
        epochId: r.epochId,
        time: r.time.toISOString(),
        east: r.east,
        north: r.north,
        height: r.height,
        dE,
        dN,
        dH,
        dHorizontal: dE === null || dN === null ? null : Math.hypot(dE, dN),
        d3D: dE === null || dN === null || dH === null ? null : Math.hypot(dE, dN, dH),
      };
    }
    return { code: r.code, kind: r.kind, group: r.group, isReference: r.isReference, latest };
  });
  return { referenceEpoch: ref ? { id: ref.id, time: ref.time.toISOString() } : null, points };
}
