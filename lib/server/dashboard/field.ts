/**
 * The strain field of a site at one epoch, for the plan and its scrubber.
 *
 * - cumulative (from = the reference epoch, or omitted): the stored ElementResult rows of the epoch
 *   against each element's reference, read in ONE query by the primary key (elementId,
 *   referenceEpochId, time, epochId), so it stays fast on sites with a long history;
 * - increment (from = another epoch): the finite strain between the two epochs' coordinates,
 *   recomputed with computeElementStrain (the exact increment, not a difference of cumulative values).
 *
 * Displacements per point are epoch − from (the site's reference epoch when cumulative).
 */
import "server-only";
import { getDb } from "../db/client.ts";
import { AppError } from "../errors.ts";
import { computeElementStrain } from "../../strain/element.ts";
import { storedValuesOf } from "../../strain/stored-values.ts";
import type { ElementKind, ElementMode, SurveyPoint } from "../../strain/types.ts";
import { planDisplacement, type FieldElement, type FieldPoint, type StrainField } from "../../plan/field.ts";
import { DEFAULT_K } from "../../plan/quantities.ts";
import { intList } from "./sql.ts";
import { referenceEpochIdOf } from "./site.ts";


type ObsRow = { epochId: number; code: string; east: number; north: number; height: number; sigmaEast: number; sigmaNorth: number; sigmaHeight: number };

async function loadObservations(epochIds: number[]): Promise<Map<number, Map<string, SurveyPoint>>> {
  const rows = await getDb().$queryRawUnsafe<ObsRow[]>(
    `SELECT o."epochId", p.code, o.east, o.north, o.height, o."sigmaEast", o."sigmaNorth", o."sigmaHeight"
       FROM "Observation" o JOIN "Point" p ON p.id = o."pointId" WHERE o."epochId" = ANY($1::int[])`,
    intList(epochIds),
  );
  const out = new Map<number, Map<string, SurveyPoint>>();
  for (const id of epochIds) out.set(id, new Map());
  for (const r of rows) out.get(r.epochId)?.set(r.code, r);
  return out;
}

function displacements(ref: Map<string, SurveyPoint>, cur: Map<string, SurveyPoint>): FieldPoint[] {
  const out: FieldPoint[] = [];
  for (const [code, c] of cur) {
    const r = ref.get(code);
    if (r) out.push({ code, ...planDisplacement(r, c) });
  }
  return out;
}

const fin = (v: number | null | undefined): number | null => (v === null || v === undefined || !Number.isFinite(v) ? null : v);

type FieldElementRow = { id: number; kind: string; mode: string; pointCodes: string[]; referenceEpochId: number | null };

/**
 * The stored cumulative results of the site's enabled elements at one epoch, each against its own
 * reference (the site's when it has none), in one query by the full key (element, reference, the
 * epoch's time, epoch).
 */
async function loadStoredField(siteId: number, epochId: number, siteRef: number): Promise<FieldElement[]> {
  return getDb().$queryRawUnsafe<FieldElement[]>(
    `SELECT r."elementId" AS id, r.status, r."greenMax", r."greenMin", r."maxShear", r."arealStrain", r."rotationDeg",
            r."azimuthMaxDeg", r.engineering, r."sigmaGreenMax", r."sigmaGreenMin", r."sigmaMaxShear", r."sigmaArealStrain",
            r."sigmaEngineering"
       FROM "Element" e
       JOIN "ElementResult" r ON r."elementId" = e.id AND r."referenceEpochId" = COALESCE(e."referenceEpochId", $2)
        AND r."time" = (SELECT ep."time" FROM "Epoch" ep WHERE ep.id = $3) AND r."epochId" = $3
      WHERE e."siteId" = $1 AND e."disabledAt" IS NULL`,
    siteId,
    siteRef,
    epochId,
  );
}

/**
 * `preloaded`: what the caller has already read, to save queries: the site's reference epoch id
 * (as referenceEpochIdOf gives it) and, for increments, the site's enabled elements.
 */
export async function getStrainField(
  siteId: number,
  opts: { epochId: number; fromEpochId?: number | null; k?: number },
  preloaded: { siteReferenceEpochId?: number | null; elements?: FieldElementRow[] } = {},
): Promise<StrainField> {
  const db = getDb();
  const k = opts.k ?? DEFAULT_K;
  let siteRef: number | null;
  if (preloaded.siteReferenceEpochId !== undefined) siteRef = preloaded.siteReferenceEpochId;
  else {
    const site = await db.site.findUnique({ where: { id: siteId }, select: { referenceEpochId: true } });
    if (!site) throw new AppError("not_found", "No such site.");
    siteRef = await referenceEpochIdOf(siteId, site.referenceEpochId);
  }
  const fromId = opts.fromEpochId ?? siteRef;
  if (fromId === null) throw new AppError("not_found", "The site has no epochs yet.");
  const mode = fromId === siteRef ? "cumulative" : "increment";
  const ids = [...new Set([opts.epochId, fromId])];
  // One round trip: the two epochs (checked to belong to the site before anything is returned), their observations and, when cumulative, the stored results.
  const [epochs, obs, stored] = await Promise.all([
    db.epoch.findMany({ where: { siteId, id: { in: ids } }, select: { id: true, time: true } }),
    loadObservations(ids),
    mode === "cumulative" ? loadStoredField(siteId, opts.epochId, fromId) : Promise.resolve(null),
  ]);
  const epoch = epochs.find((e) => e.id === opts.epochId);
  const from = epochs.find((e) => e.id === fromId);
  if (!epoch) throw new AppError("not_found", `No epoch ${opts.epochId} on this site.`);
  if (!from) throw new AppError("not_found", `No epoch ${fromId} on this site.`);
  const ref = obs.get(from.id)!;
  const cur = obs.get(epoch.id)!;
  const points = displacements(ref, cur);

  let out: FieldElement[];
  if (stored) out = stored;
  else {
    const elements = preloaded.elements ?? (await db.element.findMany({ where: { siteId, disabledAt: null }, select: { id: true, kind: true, mode: true, pointCodes: true, referenceEpochId: true } }));
    out = elements.map((el) => {
      const { status, values } = storedValuesOf(computeElementStrain({ id: String(el.id), kind: el.kind as ElementKind, mode: el.mode as ElementMode, points: el.pointCodes }, ref, cur));
      return { id: el.id, status, ...values };
    });
  }
  return { mode, epoch: { id: epoch.id, timeMs: epoch.time.getTime() }, from: { id: from.id, timeMs: from.time.getTime() }, k, elements: out, points };
}
