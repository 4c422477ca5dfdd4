/**
 * Read model of the element page: the element (through the elements service), its points with
 * reference and latest coordinates and displacements, every strain measure at the latest epoch
 * recomputed from the coordinates (computeElementStrain, one epoch), its trigger rules and alerts.
 */
import "server-only";
import { getDb } from "../db/client.ts";
import type { SiteRow } from "../http/route.ts";
import { getElement, type ElementView } from "../elements.ts";
import { computeElementStrain, type ElementJson } from "../../strain/element.ts";
import type { ElementKind, ElementMode, SurveyPoint } from "../../strain/types.ts";
import { planDisplacement } from "../../plan/field.ts";

export interface ElementPointRow {
  code: string;
  isReference: boolean;
  ref: SurveyPoint | null;
  cur: SurveyPoint | null;
  displacement: { dE: number; dN: number; dH: number; d2D: number; significant: boolean | null } | null;
}

export interface ElementRuleLine {
  id: number;
  name: string;
  quantity: string;
  reviewLevel: number;
  alertLevel: number;
  limitLevel: number;
  enabled: boolean;
  significantOnly: boolean;
  preset: string | null;
}

export interface ElementDetail {
  element: ElementView;
  referenceEpoch: { id: number; timeMs: number } | null;
  latestEpoch: { id: number; timeMs: number } | null;
  points: ElementPointRow[];
  strain: ElementJson | null;
  rules: ElementRuleLine[];
}

async function epochPoints(epochId: number, codes: string[], siteId: number): Promise<Map<string, SurveyPoint>> {
  const rows = await getDb().observation.findMany({
    where: { epochId, point: { siteId, code: { in: codes } } },
    select: { east: true, north: true, height: true, sigmaEast: true, sigmaNorth: true, sigmaHeight: true, point: { select: { code: true } } },
  });
  return new Map(rows.map((r) => [r.point.code, { east: r.east, north: r.north, height: r.height, sigmaEast: r.sigmaEast, sigmaNorth: r.sigmaNorth, sigmaHeight: r.sigmaHeight }]));
}

export async function getElementDetail(site: SiteRow, elementId: number): Promise<ElementDetail> {
  const db = getDb();
  const element = await getElement(db, site, elementId);
  const refId = element.effectiveReferenceEpochId;
  const [refEpoch, lastResult, pointRows, rules] = await Promise.all([
    refId ? db.epoch.findUnique({ where: { id: refId }, select: { id: true, time: true } }) : null,
    refId ? db.elementResult.findFirst({ where: { elementId, referenceEpochId: refId }, orderBy: [{ time: "desc" }, { epochId: "desc" }], select: { epochId: true, time: true } }) : null,
    db.point.findMany({ where: { siteId: site.id, code: { in: element.points } }, select: { code: true, isReference: true } }),
    db.triggerRule.findMany({ where: { siteId: site.id, elementIds: { has: elementId } }, orderBy: { name: "asc" } }),
  ]);
  // Latest epoch: of the element's results; else the site's latest current epoch.
  const latest = lastResult
    ? { id: lastResult.epochId, time: lastResult.time }
    : await db.epoch.findFirst({ where: { siteId: site.id, isCurrent: true }, orderBy: { time: "desc" }, select: { id: true, time: true } });
  const ref = refEpoch ? await epochPoints(refEpoch.id, element.points, site.id) : new Map<string, SurveyPoint>();
  const cur = latest ? await epochPoints(latest.id, element.points, site.id) : new Map<string, SurveyPoint>();
  const isRef = new Map(pointRows.map((p) => [p.code, p.isReference]));
  const points: ElementPointRow[] = element.points.map((code) => {
    const r = ref.get(code) ?? null;
    const c = cur.get(code) ?? null;
    const d = r && c ? planDisplacement(r, c) : null;
    return { code, isReference: isRef.get(code) ?? false, ref: r, cur: c, displacement: d ? { ...d, d2D: Math.hypot(d.dE, d.dN) } : null };
  });
  const strain =
    refEpoch && latest
      ? computeElementStrain({ id: element.name, kind: element.kind as ElementKind, mode: element.mode as ElementMode, points: element.points }, ref, cur)
      : null;
  return {
    element,
    referenceEpoch: refEpoch ? { id: refEpoch.id, timeMs: refEpoch.time.getTime() } : null,
    latestEpoch: latest ? { id: latest.id, timeMs: latest.time.getTime() } : null,
    points,
    strain,
    rules: rules.map((r) => ({
      id: r.id,
      name: r.name,
      quantity: r.quantity,
      reviewLevel: r.reviewLevel,
      alertLevel: r.alertLevel,
      limitLevel: r.limitLevel,
      enabled: r.enabled,
      significantOnly: r.significantOnly,
      preset: r.preset,
    })),
  };
}
