/**
 * Sites: create (validated by siteCreateSchema) and list. Used by `epochal site` and the demo seed.
 */
import { getDb, type Db } from "./db/client.ts";
import { AppError } from "./errors.ts";
import { recordAudit } from "./audit.ts";
import { siteCreateSchema, type SiteCreateInput } from "./schemas/ingest.ts";

export interface SiteSummary {
  id: number;
  slug: string;
  name: string;
  timeZone: string;
  sigmaHM: number;
  sigmaVM: number;
  origin: { latDeg: number; lonDeg: number; heightM: number } | null;
  refuseUnknownPoints: boolean;
  points: number;
  epochs: number;
  lastEpochTime: string | null;
}

/** Creates a site; 422 for bad fields, 409 when the slug is taken. */
export async function createSite(input: SiteCreateInput, actor: string, db: Db = getDb()): Promise<SiteSummary> {
  const p = siteCreateSchema.safeParse(input);
  if (!p.success) {
    throw new AppError("invalid", "Bad site.", { errors: p.error.issues.map((i) => ({ line: null, field: i.path.map(String).join(".") || null, message: i.message })) });
  }
  const d = p.data;
  const site = await db.$transaction(async (tx) => {
    const taken = await tx.site.findUnique({ where: { slug: d.slug }, select: { id: true } });
    if (taken) throw new AppError("conflict", `A site with slug "${d.slug}" already exists.`);
    const s = await tx.site.create({
      data: {
        slug: d.slug,
        name: d.name,
        timeZone: d.timeZone,
        ...(d.sigmaHM === undefined ? {} : { sigmaHM: d.sigmaHM }),
        ...(d.sigmaVM === undefined ? {} : { sigmaVM: d.sigmaVM }),
        originLatDeg: d.originLatDeg ?? null,
        originLonDeg: d.originLonDeg ?? null,
        originHeightM: d.originHeightM ?? null,
        refuseUnknownPoints: d.refuseUnknownPoints ?? false,
      },
    });
    await recordAudit(tx, { actor, siteId: s.id, action: "site.create", entityType: "site", entityId: String(s.id), after: s });
    return s;
  });
  return (await listSites(db, site.id))[0];
}

/** All sites (or one, by id), by slug, with point and epoch counts. */
export async function listSites(db: Db = getDb(), onlyId?: number): Promise<SiteSummary[]> {
  const rows = await db.$queryRawUnsafe<
    { id: number; slug: string; name: string; timeZone: string; sigmaHM: number; sigmaVM: number; originLatDeg: number | null; originLonDeg: number | null; originHeightM: number | null; refuseUnknownPoints: boolean; points: number; epochs: number; last: Date | null }[]
  >(
    `SELECT s.id, s.slug, s.name, s."timeZone", s."sigmaHM", s."sigmaVM", s."originLatDeg", s."originLonDeg", s."originHeightM", s."refuseUnknownPoints",
            (SELECT count(*) FROM "Point" p WHERE p."siteId" = s.id)::int AS points,
            (SELECT count(*) FROM "Epoch" e WHERE e."siteId" = s.id AND e."isCurrent")::int AS epochs,
            (SELECT max(e.time) FROM "Epoch" e WHERE e."siteId" = s.id AND e."isCurrent") AS last
       FROM "Site" s ${onlyId === undefined ? "" : "WHERE s.id = $1"} ORDER BY s.slug`,
    ...(onlyId === undefined ? [] : [onlyId]),
  );
  return rows.map((r) => ({
    id: r.id,
    slug: r.slug,
    name: r.name,
    timeZone: r.timeZone,
    sigmaHM: r.sigmaHM,
    sigmaVM: r.sigmaVM,
    origin: r.originLatDeg === null || r.originLonDeg === null || r.originHeightM === null ? null : { latDeg: r.originLatDeg, lonDeg: r.originLonDeg, heightM: r.originHeightM },
    refuseUnknownPoints: r.refuseUnknownPoints,
    points: r.points,
    epochs: r.epochs,
    lastEpochTime: r.last ? r.last.toISOString() : null,
  }));
}
