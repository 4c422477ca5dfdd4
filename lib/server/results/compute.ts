/**
 * Element results: after epochs are stored, every enabled Element of the site is computed at each of
 * those epochs against its reference epoch (Element.referenceEpochId, else Site.referenceEpochId, else
 * the site's first current epoch) and one cumulative ElementResult row is written per element and
 * epoch, in the caller's transaction. Plan triangles go through the batch kernel (lib/strain/batch.ts),
 * everything else through `computeElementStrain`. Rows are written with one INSERT … SELECT FROM
 * unnest(…) per 50,000 rows; re-computing an (element, reference, epoch) replaces its row (results are
 * derived), unless the caller says the epochs are new (`newEpochs`), when a plain INSERT is enough.
 */
import type { Prisma } from "../db/generated/client.ts";
import type { Db } from "../db/client.ts";
import { computeElementStrain, type ElementSpec } from "../../strain/element.ts";
import { computeTriangleBatch, createTriangleBatchOut, BATCH_OK } from "../../strain/batch.ts";
import type { ElementKind, ElementMode, SurveyPoint } from "../../strain/types.ts";
import { floatArray, intArray, textArray } from "../ingest/sql-arrays.ts";

export type Tx = Prisma.TransactionClient | Db;

interface ResultRow {
  elementId: number;
  epochId: number;
  referenceEpochId: number;
  timeIso: string;
  status: string;
  greenMax: number | null;
  greenMin: number | null;
  maxShear: number | null;
  arealStrain: number | null;
  rotationDeg: number | null;
  azimuthMaxDeg: number | null;
  engineering: number | null;
  sigmaGreenMax: number | null;
  sigmaGreenMin: number | null;
  sigmaMaxShear: number | null;
  sigmaArealStrain: number | null;
  sigmaEngineering: number | null;
}

const EMPTY = {
  greenMax: null,
  greenMin: null,
  maxShear: null,
  arealStrain: null,
  rotationDeg: null,
  azimuthMaxDeg: null,
  engineering: null,
  sigmaGreenMax: null,
  sigmaGreenMin: null,
  sigmaMaxShear: null,
  sigmaArealStrain: null,
  sigmaEngineering: null,
} as const;

type EpochPoints = Map<string, SurveyPoint>;

/** The site's reference epoch: Site.referenceEpochId, else its first current epoch (by time), else null. */
export async function siteReferenceEpochId(tx: Tx, siteId: number): Promise<number | null> {
  const site = await tx.site.findUnique({ where: { id: siteId }, select: { referenceEpochId: true } });
  if (site?.referenceEpochId) return site.referenceEpochId;
  const first = await tx.epoch.findFirst({ where: { siteId, isCurrent: true }, orderBy: [{ time: "asc" }, { id: "asc" }], select: { id: true } });
  return first?.id ?? null;
}

async function loadEpochPoints(tx: Tx, epochIds: number[]): Promise<Map<number, EpochPoints>> {
  const rows = await tx.$queryRawUnsafe<
    { epochId: number; code: string; east: number; north: number; height: number; sigmaEast: number; sigmaNorth: number; sigmaHeight: number }[]
  >(
    `SELECT o."epochId", p.code, o.east, o.north, o.height, o."sigmaEast", o."sigmaNorth", o."sigmaHeight"
       FROM "Observation" o JOIN "Point" p ON p.id = o."pointId"
      WHERE o."epochId" = ANY($1::int[])`,
    intArray(epochIds),
  );
  const out = new Map<number, EpochPoints>();
  for (const id of epochIds) out.set(id, new Map());
  for (const r of rows) {
    out.get(r.epochId)?.set(r.code, { east: r.east, north: r.north, height: r.height, sigmaEast: r.sigmaEast, sigmaNorth: r.sigmaNorth, sigmaHeight: r.sigmaHeight });
  }
  return out;
}

const num = (v: number | null | undefined): number | null => (v === undefined || v === null || !Number.isFinite(v) ? null : v);

/** One element at one epoch through the per-element engine, as a result row. */
function elementRow(el: { id: number; kind: string; mode: string; pointCodes: string[] }, ref: EpochPoints, cur: EpochPoints, head: Pick<ResultRow, "elementId" | "epochId" | "referenceEpochId" | "timeIso">): ResultRow {
  const spec: ElementSpec = { id: String(el.id), kind: el.kind as ElementKind, mode: el.mode as ElementMode, points: el.pointCodes };
  const r = computeElementStrain(spec, ref, cur);
  if (r.status !== "ok") return { ...head, status: r.status, ...EMPTY };
  if ("engineering" in r) return { ...head, status: "ok", ...EMPTY, engineering: r.engineering, sigmaEngineering: r.sigma.engineering };
  if ("volumetricStrain" in r) {
    // 3D groups: principal Green strains and shear; areal strain does not apply (volumetric strain is not stored here).
    return { ...head, status: "ok", ...EMPTY, greenMax: r.greenMax, greenMin: r.greenMin, maxShear: r.maxShear, rotationDeg: r.rotationDeg, sigmaGreenMax: r.sigma.greenMax, sigmaGreenMin: r.sigma.greenMin, sigmaMaxShear: r.sigma.maxShear };
  }
  return {
    ...head,
    status: "ok",
    ...EMPTY,
    greenMax: r.greenMax,
    greenMin: r.greenMin,
    maxShear: r.maxShear,
    arealStrain: r.arealStrain,
    rotationDeg: r.rotationDeg,
    azimuthMaxDeg: "azimuthMaxDeg" in r ? num(r.azimuthMaxDeg) : null,
    sigmaGreenMax: r.sigma.greenMax,
    sigmaGreenMin: r.sigma.greenMin,
    sigmaMaxShear: r.sigma.maxShear,
    sigmaArealStrain: r.sigma.arealStrain,
  };
}

/**
 * Computes and stores the results of every enabled element of `siteId` at each epoch of `epochIds`.
 * Returns the number of rows written. Call it inside the transaction that stored the epochs.
 */
export async function computeResultsForEpochs(tx: Tx, siteId: number, epochIds: readonly number[], opts: { newEpochs?: boolean } = {}): Promise<number> {
  if (epochIds.length === 0) return 0;
  // Raw query: thousands of triangulated elements deserialise much faster than through findMany.
  const elements = await tx.$queryRawUnsafe<{ id: number; kind: string; mode: string; pointCodes: string[]; referenceEpochId: number | null }[]>(
    `SELECT id, kind, mode, "pointCodes", "referenceEpochId" FROM "Element" WHERE "siteId" = $1 AND "disabledAt" IS NULL ORDER BY id`,
    siteId,
  );
  if (elements.length === 0) return 0;
  const siteRef = await siteReferenceEpochId(tx, siteId);
  const epochs = await tx.epoch.findMany({ where: { id: { in: [...epochIds] }, siteId }, select: { id: true, time: true } });
  const refIds = new Set<number>();
  for (const el of elements) {
    const r = el.referenceEpochId ?? siteRef;
    if (r !== null) refIds.add(r);
  }
  if (refIds.size === 0) return 0;
  const points = await loadEpochPoints(tx, [...new Set([...refIds, ...epochs.map((e) => e.id)])]);
  const rows: ResultRow[] = [];

  // Group the elements by reference epoch; plan triangles of a group go through the batch kernel together.
  const byRef = new Map<number, typeof elements>();
  for (const el of elements) {
    const r = el.referenceEpochId ?? siteRef;
    if (r === null) continue;
    let list = byRef.get(r);
    if (!list) byRef.set(r, (list = []));
    list.push(el);
  }
  for (const [refId, els] of byRef) {
    const ref = points.get(refId) ?? new Map<string, SurveyPoint>();
    const batchable = els.filter((e) => e.kind === "triangle" && e.mode === "plan" && e.pointCodes.length === 3 && new Set(e.pointCodes).size === 3 && e.pointCodes.every((c) => ref.has(c)));
    const batchIds = new Set(batchable.map((e) => e.id));
    const others = els.filter((e) => !batchIds.has(e.id));
    for (const ep of epochs) {
      const cur = points.get(ep.id) ?? new Map<string, SurveyPoint>();
      const head = { epochId: ep.id, referenceEpochId: refId, timeIso: ep.time.toISOString() };
      for (const el of others) rows.push(elementRow(el, ref, cur, { ...head, elementId: el.id }));
      // Batch: only triangles whose three points are in this epoch; the rest take the per-element path (missing-point).
      const tri: typeof batchable = [];
      for (const el of batchable) {
        if (el.pointCodes.every((c) => cur.has(c))) tri.push(el);
        else rows.push(elementRow(el, ref, cur, { ...head, elementId: el.id }));
      }
      if (tri.length === 0) continue;
      const n = tri.length;
      const refXY = new Float64Array(6 * n), curXY = new Float64Array(6 * n), sigmaRef = new Float64Array(6 * n), sigmaCur = new Float64Array(6 * n);
      tri.forEach((el, t) => {
        el.pointCodes.forEach((c, k) => {
          const R = ref.get(c) as SurveyPoint;
          const C = cur.get(c) as SurveyPoint;
          const o = 6 * t + 2 * k;
          refXY[o] = R.east; refXY[o + 1] = R.north; curXY[o] = C.east; curXY[o + 1] = C.north;
          sigmaRef[o] = R.sigmaEast; sigmaRef[o + 1] = R.sigmaNorth; sigmaCur[o] = C.sigmaEast; sigmaCur[o + 1] = C.sigmaNorth;
        });
      });
      const out = createTriangleBatchOut(n, true);
      computeTriangleBatch({ refXY, curXY, sigmaRef, sigmaCur }, out);
      for (let s = 0; s < n; s++) {
        const h = { ...head, elementId: tri[s].id };
        if (out.status[s] !== BATCH_OK) {
          rows.push({ ...h, status: "degenerate", ...EMPTY });
          continue;
        }
        rows.push({
          ...h,
          status: "ok",
          ...EMPTY,
          greenMax: out.greenMax[s],
          greenMin: out.greenMin[s],
          maxShear: out.maxShear[s],
          arealStrain: out.arealStrain[s],
          rotationDeg: out.rotationDeg[s],
          azimuthMaxDeg: num(out.azimuthMaxDeg[s]),
          sigmaGreenMax: (out.sigmaGreenMax as Float64Array)[s],
          sigmaGreenMin: (out.sigmaGreenMin as Float64Array)[s],
          sigmaMaxShear: (out.sigmaMaxShear as Float64Array)[s],
          sigmaArealStrain: (out.sigmaArealStrain as Float64Array)[s],
        });
      }
    }
  }
  await insertResultRows(tx, rows, opts.newEpochs === true);
  return rows.length;
}

const RESULT_CHUNK = 50_000;

/** `fresh`: the epochs were stored in this transaction, so no row can exist yet (plain INSERT, cheaper). */
async function insertResultRows(tx: Tx, rows: readonly ResultRow[], fresh: boolean): Promise<void> {
  for (let i = 0; i < rows.length; i += RESULT_CHUNK) {
    const part = rows.slice(i, i + RESULT_CHUNK);
    const col = (k: keyof typeof EMPTY): string => floatArray(part.map((r) => r[k]));
    await tx.$executeRawUnsafe(
      `INSERT INTO "ElementResult" ("elementId", "epochId", "referenceEpochId", "time", "status",
         "greenMax", "greenMin", "maxShear", "arealStrain", "rotationDeg", "azimuthMaxDeg", "engineering",
         "sigmaGreenMax", "sigmaGreenMin", "sigmaMaxShear", "sigmaArealStrain", "sigmaEngineering")
       SELECT * FROM unnest($1::int[], $2::int[], $3::int[], $4::timestamptz[], $5::text[],
         $6::float8[], $7::float8[], $8::float8[], $9::float8[], $10::float8[], $11::float8[], $12::float8[],
         $13::float8[], $14::float8[], $15::float8[], $16::float8[], $17::float8[])
       ${fresh ? "" : `ON CONFLICT ("elementId", "referenceEpochId", "epochId") DO UPDATE SET
         "time" = EXCLUDED."time", "status" = EXCLUDED."status", "greenMax" = EXCLUDED."greenMax", "greenMin" = EXCLUDED."greenMin",
         "maxShear" = EXCLUDED."maxShear", "arealStrain" = EXCLUDED."arealStrain", "rotationDeg" = EXCLUDED."rotationDeg",
         "azimuthMaxDeg" = EXCLUDED."azimuthMaxDeg", "engineering" = EXCLUDED."engineering",
         "sigmaGreenMax" = EXCLUDED."sigmaGreenMax", "sigmaGreenMin" = EXCLUDED."sigmaGreenMin", "sigmaMaxShear" = EXCLUDED."sigmaMaxShear",
         "sigmaArealStrain" = EXCLUDED."sigmaArealStrain", "sigmaEngineering" = EXCLUDED."sigmaEngineering"`}`,
      intArray(part.map((r) => r.elementId)),
      intArray(part.map((r) => r.epochId)),
      intArray(part.map((r) => r.referenceEpochId)),
      textArray(part.map((r) => r.timeIso)),
      textArray(part.map((r) => r.status)),
      col("greenMax"),
      col("greenMin"),
      col("maxShear"),
      col("arealStrain"),
      col("rotationDeg"),
      col("azimuthMaxDeg"),
      col("engineering"),
      col("sigmaGreenMax"),
      col("sigmaGreenMin"),
      col("sigmaMaxShear"),
      col("sigmaArealStrain"),
      col("sigmaEngineering"),
    );
  }
}
