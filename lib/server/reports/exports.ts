/**
 * Data exports of one site and period: observations, computed strains and elements, read from the
 * database and written by the pure writers of lib/formats/export-csv.ts and export-geojson.ts.
 *
 * - observations: every observation of the current revision of each epoch with time in [from, to],
 *   ordered by time, then point code;
 * - results: ElementResult rows of the enabled elements against each element's effective reference
 *   epoch (its own, else the site's), time in [from, to], ordered by time, then element name;
 * - elements: the enabled elements at their points' reference positions (lib/server/dashboard/site.ts
 *   getPlanGeometry), each with its last result at or before `to`.
 * The audit log's CSV is the one of lib/server/audit.ts (GET /api/v1/audit.csv?site=slug).
 */
import { getDb, type Db } from "../db/client.ts";
import type { SiteRow } from "../http/route.ts";
import { siteReferenceEpochId } from "../results/compute.ts";
import { getPlanGeometry } from "../dashboard/site.ts";
import { enuFrame, type EnuFrame } from "../../geodesy/enu.ts";
import { observationsCsv, resultsCsv, type ExportObservation, type ExportResult } from "../../formats/export-csv.ts";
import { elementsGeoJson, observationsGeoJson, type ExportElement, type ExportSite, type FeatureCollection } from "../../formats/export-geojson.ts";
import { twoSidedK } from "../../strain/normal-quantile.ts";
import type { Period } from "../schemas/reports.ts";

export interface SiteExportInfo extends ExportSite {
  id: number;
  timeZone: string;
  frame: EnuFrame | null;
  /** Significance factor k from Site.confidence (two-sided normal quantile). */
  k: number;
}

export async function siteExportInfo(site: Pick<SiteRow, "id">, db: Db = getDb()): Promise<SiteExportInfo> {
  const s = await db.site.findUniqueOrThrow({ where: { id: site.id } });
  const frame = s.originLatDeg !== null && s.originLonDeg !== null && s.originHeightM !== null ? enuFrame({ latDeg: s.originLatDeg, lonDeg: s.originLonDeg, heightM: s.originHeightM }) : null;
  return { id: s.id, slug: s.slug, name: s.name, timeZone: s.timeZone, frameDescription: s.frameDescription, frame, k: twoSidedK(s.confidence) };
}

type ObsRow = { tm: number; code: string; east: number; north: number; height: number; sigmaEast: number; sigmaNorth: number; sigmaHeight: number };

export async function readObservations(siteId: number, period: Period, db: Db = getDb()): Promise<ExportObservation[]> {
  const rows = await db.$queryRawUnsafe<ObsRow[]>(
    `SELECT (extract(epoch FROM e."time") * 1000)::float8 AS tm, p.code, o.east, o.north, o.height, o."sigmaEast", o."sigmaNorth", o."sigmaHeight"
       FROM "Observation" o JOIN "Epoch" e ON e.id = o."epochId" JOIN "Point" p ON p.id = o."pointId"
      WHERE e."siteId" = $1 AND e."isCurrent" AND e."time" >= $2 AND e."time" <= $3
      ORDER BY e."time", p.code`,
    siteId,
    new Date(period.fromMs),
    new Date(period.toMs),
  );
  return rows.map((r) => ({ timeMs: Number(r.tm), point: r.code, eastM: r.east, northM: r.north, heightM: r.height, sigmaEastM: r.sigmaEast, sigmaNorthM: r.sigmaNorth, sigmaHeightM: r.sigmaHeight }));
}

type ResultRow = Omit<ExportResult, "timeMs" | "referenceTimeMs"> & { tm: number; rtm: number | null };

export async function readResults(siteId: number, period: Period, db: Db = getDb()): Promise<ExportResult[]> {
  const siteRef = await siteReferenceEpochId(db, siteId);
  if (siteRef === null) return [];
  const rows = await db.$queryRawUnsafe<ResultRow[]>(
    `SELECT (extract(epoch FROM r."time") * 1000)::float8 AS tm, el.name AS element, el.kind, el.mode, r.status,
            (extract(epoch FROM re."time") * 1000)::float8 AS rtm,
            r."greenMax", r."greenMin", r."maxShear", r."arealStrain", r."rotationDeg", r."azimuthMaxDeg", r.engineering,
            r."sigmaGreenMax", r."sigmaGreenMin", r."sigmaMaxShear", r."sigmaArealStrain", r."sigmaEngineering"
       FROM "Element" el
       JOIN "ElementResult" r ON r."elementId" = el.id AND r."referenceEpochId" = coalesce(el."referenceEpochId", $2)
       JOIN "Epoch" e ON e.id = r."epochId" AND e."isCurrent"
       LEFT JOIN "Epoch" re ON re.id = r."referenceEpochId"
      WHERE el."siteId" = $1 AND el."disabledAt" IS NULL AND r."time" >= $3 AND r."time" <= $4
      ORDER BY r."time", el.name`,
    siteId,
    siteRef,
    new Date(period.fromMs),
    new Date(period.toMs),
  );
  return rows.map(({ tm, rtm, ...r }) => ({ ...r, timeMs: Number(tm), referenceTimeMs: rtm === null ? null : Number(rtm) }));
}

type LatestRow = { elementId: number; tm: number; status: string; greenMax: number | null; greenMin: number | null; maxShear: number | null; arealStrain: number | null; engineering: number | null; sigmaGreenMax: number | null; sigmaEngineering: number | null };

export async function readElements(siteId: number, period: Period, db: Db = getDb()): Promise<{ elements: ExportElement[]; positions: Map<string, { east: number; north: number; height: number }> }> {
  const siteRef = await siteReferenceEpochId(db, siteId);
  const geo = await getPlanGeometry(siteId, siteRef);
  const latest = siteRef === null
    ? []
    : await db.$queryRawUnsafe<LatestRow[]>(
        `SELECT el.id AS "elementId", (extract(epoch FROM r."time") * 1000)::float8 AS tm, r.status, r."greenMax", r."greenMin", r."maxShear",
                r."arealStrain", r.engineering, r."sigmaGreenMax", r."sigmaEngineering"
           FROM "Element" el
           CROSS JOIN LATERAL (
             SELECT x.* FROM "ElementResult" x JOIN "Epoch" e ON e.id = x."epochId" AND e."isCurrent"
              WHERE x."elementId" = el.id AND x."referenceEpochId" = coalesce(el."referenceEpochId", $2) AND x."time" <= $3
              ORDER BY x."time" DESC LIMIT 1) r
          WHERE el."siteId" = $1 AND el."disabledAt" IS NULL`,
        siteId,
        siteRef,
        new Date(period.toMs),
      );
  const byId = new Map(latest.map((l) => [l.elementId, l]));
  const elements: ExportElement[] = geo.elements.map((e) => {
    const l = byId.get(e.id);
    return {
      id: e.id,
      name: e.name,
      label: e.label,
      kind: e.kind,
      mode: e.mode,
      pointCodes: e.pointCodes,
      latest: l ? { timeMs: Number(l.tm), status: l.status, greenMax: l.greenMax, greenMin: l.greenMin, maxShear: l.maxShear, arealStrain: l.arealStrain, engineering: l.engineering, sigmaGreenMax: l.sigmaGreenMax, sigmaEngineering: l.sigmaEngineering } : null,
    };
  });
  return { elements, positions: new Map(geo.points.map((p) => [p.code, { east: p.east, north: p.north, height: p.height }])) };
}

export type ExportKind = "observations.csv" | "observations.geojson" | "results.csv" | "elements.geojson";
export const EXPORT_KINDS: readonly ExportKind[] = ["observations.csv", "observations.geojson", "results.csv", "elements.geojson"];

/** The body, media type and file name of one export. */
export async function buildExport(site: Pick<SiteRow, "id">, kind: ExportKind, period: Period, db: Db = getDb()): Promise<{ body: string; type: string; filename: string }> {
  const info = await siteExportInfo(site, db);
  const stamp = `${new Date(period.fromMs).toISOString().slice(0, 10)}_${new Date(period.toMs).toISOString().slice(0, 10)}`;
  const filename = `${info.slug}-${kind.replace(".", `-${stamp}.`)}`;
  const json = (fc: FeatureCollection): string => JSON.stringify(fc);
  switch (kind) {
    case "observations.csv":
      return { body: observationsCsv(await readObservations(info.id, period, db)), type: "text/csv; charset=utf-8", filename };
    case "results.csv":
      return { body: resultsCsv(await readResults(info.id, period, db), info.k), type: "text/csv; charset=utf-8", filename };
    case "observations.geojson":
      return { body: json(observationsGeoJson(info, info.frame, await readObservations(info.id, period, db), period)), type: "application/geo+json", filename };
    case "elements.geojson": {
      const { elements, positions } = await readElements(info.id, period, db);
      return { body: json(elementsGeoJson(info, info.frame, elements, positions, period)), type: "application/geo+json", filename };
    }
  }
}
