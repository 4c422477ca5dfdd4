/** Shared shapes of the site plan: the points and elements the page sends (lib/plan/wire.ts) and the drawable element shapes. */
import type { PlanElement, PlanPoint } from "@/lib/plan/wire.ts";

export type PlanPointProp = PlanPoint;
export type PlanElementProp = PlanElement;

export type Shape = {
  el: PlanElementProp;
  kind: "polygon" | "line";
  pts: { x: number; y: number }[];
  c: { x: number; y: number };
  sizeM: number;
};
