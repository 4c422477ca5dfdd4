/**
 * The history of one element: its cumulative results at every current epoch of the site from its
 * reference epoch on, against that reference. Used when an element is created (all epochs) and when
 * it is re-baselined (rows against the new reference; the rows against older references are kept).
 *
 * The ingest service's `computeResultsForEpochs` (compute.ts) computes every element at new epochs;
 * this is the transpose (one element, every epoch), so it reads the element's points across epochs in
 * one query and writes its rows with one INSERT … unnest per chunk. Observations are only read.
 */
import { STORED_VALUE_KEYS, storedValuesOf, type StoredValueKey, type StoredValues } from "../../strain/stored-values.ts";
import type { Prisma } from "../db/generated/client.ts";
import type { Db } from "../db/client.ts";
import { computeElementStrain, type ElementSpec } from "../../strain/element.ts";
import type { ElementKind, ElementMode, SurveyPoint } from "../../strain/types.ts";

export type Tx = Prisma.TransactionClient | Db;

export interface HistoryElement {
  id: number;
  siteId: number;
  kind: string;
  mode: string;
  pointCodes: string[];
  referenceEpochId: number | null;
}

/** The element's effective reference: its own, else the site's, else the site's first current epoch; null without epochs. */
export async function effectiveReferenceEpochId(tx: Tx, el: Pick<HistoryElement, "siteId" | "referenceEpochId">): Promise<number | null> {
  if (el.referenceEpochId !== null) return el.referenceEpochId;
  const site = await tx.site.findUnique({ where: { id: el.siteId }, select: { referenceEpochId: true } });
  if (site?.referenceEpochId) return site.referenceEpochId;
  const first = await tx.epoch.findFirst({ where: { siteId: el.siteId, isCurrent: true }, orderBy: [{ time: "asc" }, { id: "asc" }], select: { id: true } });
  return first?.id ?? null;
}

type Row = {
  epochId: number;
  time: Date;
  code: string;
  east: number;
  north: number;
  height: number;
  sigmaEast: number;
  sigmaNorth: number;
  sigmaHeight: number;
};

const COLUMNS = STORED_VALUE_KEYS;
type Col = StoredValueKey;

function valuesOf(spec: ElementSpec, ref: Map<string, SurveyPoint>, cur: Map<string, SurveyPoint>): { status: string; v: StoredValues } {
  const { status, values } = storedValuesOf(computeElementStrain(spec, ref, cur));
  return { status, v: values };
}

const lit = (xs: readonly (number | null)[]): string => "{" + xs.map((x) => (x === null ? "NULL" : String(x))).join(",") + "}";
const CHUNK = 20_000;

/**
 * Computes and stores the element's results against `referenceEpochId` at every current epoch of
 * its site at or after the reference time (the reference epoch itself gives zero strain). Existing
 * rows for the same (element, reference, epoch) are replaced; rows against other references are
 * untouched. Returns the number of rows written.
 */
export async function computeElementHistory(tx: Tx, el: HistoryElement, referenceEpochId: number): Promise<number> {
  const refEpoch = await tx.epoch.findFirst({ where: { id: referenceEpochId, siteId: el.siteId }, select: { id: true, time: true } });
  if (!refEpoch) return 0;
  const rows = await tx.$queryRaw<Row[]>`
    SELECT o."epochId", e."time", p.code, o.east, o.north, o.height, o."sigmaEast", o."sigmaNorth", o."sigmaHeight"
      FROM "Observation" o
      JOIN "Point" p ON p.id = o."pointId"
      JOIN "Epoch" e ON e.id = o."epochId"
     WHERE p."siteId" = ${el.siteId} AND p.code = ANY(${el.pointCodes}::text[])
       AND (e.id = ${referenceEpochId} OR (e."isCurrent" AND e."time" >= ${refEpoch.time}))
     ORDER BY e."time", e.id`;
  const byEpoch = new Map<number, { time: Date; pts: Map<string, SurveyPoint> }>();
  for (const r of rows) {
    let ep = byEpoch.get(r.epochId);
    if (!ep) byEpoch.set(r.epochId, (ep = { time: r.time, pts: new Map() }));
    ep.pts.set(r.code, { east: r.east, north: r.north, height: r.height, sigmaEast: r.sigmaEast, sigmaNorth: r.sigmaNorth, sigmaHeight: r.sigmaHeight });
  }
  // Epochs without any of the element's points still get a row (missing-point), so the history has no silent holes.
  const epochs = await tx.epoch.findMany({
    where: { siteId: el.siteId, OR: [{ id: referenceEpochId }, { isCurrent: true, time: { gte: refEpoch.time } }] },
    select: { id: true, time: true },
    orderBy: [{ time: "asc" }, { id: "asc" }],
  });
  const ref = byEpoch.get(referenceEpochId)?.pts ?? new Map<string, SurveyPoint>();
  const spec: ElementSpec = { id: String(el.id), kind: el.kind as ElementKind, mode: el.mode as ElementMode, points: el.pointCodes };
  let written = 0;
  for (let i = 0; i < epochs.length; i += CHUNK) {
    const part = epochs.slice(i, i + CHUNK);
    const status: string[] = [];
    const cols: Record<Col, (number | null)[]> = Object.fromEntries(COLUMNS.map((c) => [c, []])) as unknown as Record<Col, (number | null)[]>;
    for (const ep of part) {
      const cur = byEpoch.get(ep.id)?.pts ?? new Map<string, SurveyPoint>();
      const r = valuesOf(spec, ref, cur);
      status.push(r.status);
      for (const c of COLUMNS) cols[c].push(r.v[c]);
    }
    written += await tx.$executeRawUnsafe(
      `INSERT INTO "ElementResult" ("elementId", "epochId", "referenceEpochId", "time", "status", ${COLUMNS.map((c) => `"${c}"`).join(", ")})
       SELECT $1::int, u.* FROM unnest($2::int[], $3::int[], $4::timestamptz[], $5::text[], ${COLUMNS.map((_, k) => `$${k + 6}::float8[]`).join(", ")})
         AS u("epochId", "referenceEpochId", "time", "status", ${COLUMNS.map((c) => `"${c}"`).join(", ")})
       ON CONFLICT ("elementId", "referenceEpochId", "time", "epochId") DO UPDATE SET
         "status" = EXCLUDED."status", ${COLUMNS.map((c) => `"${c}" = EXCLUDED."${c}"`).join(", ")}`,
      el.id,
      lit(part.map((e) => e.id)),
      lit(part.map(() => referenceEpochId)),
      "{" + part.map((e) => `"${e.time.toISOString()}"`).join(",") + "}",
      "{" + status.map((s) => `"${s}"`).join(",") + "}",
      ...COLUMNS.map((c) => lit(cols[c])),
    );
  }
  return written;
}
