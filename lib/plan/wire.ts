/**
 * The site plan's data as the page hands it to the browser: ONE JSON string of columns.
 *
 * A server component's props travel in React's own serialization, which walks every value (on the
 * server to write it, again for the server-side render, and once more in the browser); a site of
 * 500 points, a thousand elements and a year of epochs is some 30 000 values. As one string they
 * cost one native JSON.stringify and one JSON.parse. Columns rather than objects: no key repeated
 * per row (and a JSON string inside the page escapes every quote).
 *
 *   page.tsx:      data={encodePlanData({ points, elements, epochIds, epochTimesMs, field })}
 *   SitePlan.tsx:  const { points, elements, … } = useMemo(() => decodePlanData(props.data), [props.data])
 */
import { packField, unpackField, type PackedField, type StrainField } from "./field.ts";

/** A point as the plan draws it: east and north in metres about the page's local origin. */
export interface PlanPoint {
  code: string;
  east: number;
  north: number;
  isReference: boolean;
}

/** An element as the plan draws it. */
export interface PlanElement {
  id: number;
  name: string;
  kind: string;
  mode: string;
  pointCodes: string[];
}

export interface PlanData {
  points: PlanPoint[];
  elements: PlanElement[];
  /** Every current epoch, oldest first (parallel arrays). */
  epochIds: number[];
  epochTimesMs: number[];
  /** The field the first render shows (null: no epoch yet). */
  field: StrainField | null;
}

/** The wire form. Keys are short on purpose; each is one column. */
interface PlanWire {
  /** point codes; east, north (m about the local origin); indices of reference points */
  pc: string[];
  pe: number[];
  pn: number[];
  pr: number[];
  /** element ids as differences from the previous id (the first from 0) */
  ei: number[];
  /** distinct [kind, mode] pairs, and each element's index into them */
  ek: [string, string][];
  ec: number[];
  /** each element's point indices into `pc` */
  ep: number[][];
  /** [element index, name] where the name is not its (sent) point codes joined by "-" */
  en: [number, string][];
  /** epoch ids and UTC times (ms) as differences from the previous value (the first from 0) */
  xi: number[];
  xt: number[];
  f: PackedField | null;
}

/** Differences of consecutive values, the first from 0: consecutive ids become runs of 1. */
export function toDeltas(values: readonly number[]): number[] {
  const out = new Array<number>(values.length);
  let prev = 0;
  for (let i = 0; i < values.length; i++) {
    out[i] = values[i] - prev;
    prev = values[i];
  }
  return out;
}

/** Inverse of toDeltas (exact for integers up to 2^53). */
export function fromDeltas(deltas: readonly number[]): number[] {
  const out = new Array<number>(deltas.length);
  let acc = 0;
  for (let i = 0; i < deltas.length; i++) {
    acc += deltas[i];
    out[i] = acc;
  }
  return out;
}

/** Elements whose points are not all in `points` keep only the points that are (as the plan would draw them). */
export function encodePlanData(d: PlanData): string {
  const indexOf = new Map(d.points.map((p, i) => [p.code, i]));
  const kinds: [string, string][] = [];
  const kindIndex = new Map<string, number>();
  const ec: number[] = [];
  const ep: number[][] = [];
  const en: [number, string][] = [];
  d.elements.forEach((e, i) => {
    const km = JSON.stringify([e.kind, e.mode]);
    let k = kindIndex.get(km);
    if (k === undefined) {
      k = kinds.push([e.kind, e.mode]) - 1;
      kindIndex.set(km, k);
    }
    ec.push(k);
    const idx: number[] = [];
    for (const c of e.pointCodes) {
      const j = indexOf.get(c);
      if (j !== undefined) idx.push(j);
    }
    ep.push(idx);
    if (e.name !== idx.map((j) => d.points[j].code).join("-")) en.push([i, e.name]);
  });
  const wire: PlanWire = {
    pc: d.points.map((p) => p.code),
    pe: d.points.map((p) => p.east),
    pn: d.points.map((p) => p.north),
    pr: d.points.flatMap((p, i) => (p.isReference ? [i] : [])),
    ei: toDeltas(d.elements.map((e) => e.id)),
    ek: kinds,
    ec,
    ep,
    en,
    xi: toDeltas(d.epochIds),
    xt: toDeltas(d.epochTimesMs),
    f: d.field ? packField(d.field) : null,
  };
  return JSON.stringify(wire);
}

export function decodePlanData(text: string): PlanData {
  const w = JSON.parse(text) as PlanWire;
  const refs = new Set(w.pr);
  const points: PlanPoint[] = w.pc.map((code, i) => ({ code, east: w.pe[i], north: w.pn[i], isReference: refs.has(i) }));
  const names = new Map(w.en);
  const ids = fromDeltas(w.ei);
  const elements: PlanElement[] = ids.map((id, i) => {
    const [kind, mode] = w.ek[w.ec[i]];
    const pointCodes = w.ep[i].map((j) => w.pc[j]);
    return { id, name: names.get(i) ?? pointCodes.join("-"), kind, mode, pointCodes };
  });
  return { points, elements, epochIds: fromDeltas(w.xi), epochTimesMs: fromDeltas(w.xt), field: w.f ? unpackField(w.f) : null };
}
