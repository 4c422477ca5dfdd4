/** Shared shapes of the site plan: the props the page sends and the drawable element shapes. */
export interface PlanPointProp {
  code: string;
  east: number;
  north: number;
  isReference: boolean;
}
export interface PlanElementProp {
  id: number;
  name: string;
  kind: string;
  mode: string;
  pointCodes: string[];
}
/** An element as the page sends it: point indices into `points`; name only when it is not the codes joined by "-". */
export interface PlanElementWire {
  id: number;
  n?: string;
  k: string;
  m: string;
  p: number[];
}

export type Shape = {
  el: PlanElementProp;
  kind: "polygon" | "line";
  pts: { x: number; y: number }[];
  c: { x: number; y: number };
  sizeM: number;
};
