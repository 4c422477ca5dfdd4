import type { SurveyPoint } from "../../../lib/strain/types.ts";

export const SIGMA_H = 0.001;
export const SIGMA_V = 0.0015;

export function pt(east: number, north: number, height = 0, sigmaH = SIGMA_H, sigmaV = SIGMA_V): SurveyPoint {
  return { east, north, height, sigmaEast: sigmaH, sigmaNorth: sigmaH, sigmaHeight: sigmaV };
}

/** Apply x' = F·x + t in plan to a point (height kept). */
export function mapPlan(p: SurveyPoint, f: number[][], t: [number, number] = [0, 0]): SurveyPoint {
  return { ...p, east: f[0][0] * p.east + f[0][1] * p.north + t[0], north: f[1][0] * p.east + f[1][1] * p.north + t[1] };
}

export type Tri = [SurveyPoint, SurveyPoint, SurveyPoint];

export function relClose(a: number, b: number, rel: number, abs = 0): boolean {
  return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b)) + abs;
}

const COORDS = ["east", "north", "height"] as const;
const SIGMAS = { east: "sigmaEast", north: "sigmaNorth", height: "sigmaHeight" } as const;

/**
 * σ of f by a numeric Jacobian (central differences, step h) over every coordinate of both epochs:
 * √Σ ((f(c + h) − f(c − h)) / 2h)² σ².
 */
export function numericSigma(ref: SurveyPoint[], cur: SurveyPoint[], f: (ref: SurveyPoint[], cur: SurveyPoint[]) => number, h: number, dims: 2 | 3 = 2): number {
  let sum = 0;
  for (const which of ["ref", "cur"] as const) {
    const pts = which === "ref" ? ref : cur;
    for (let i = 0; i < pts.length; i++) {
      for (const c of COORDS.slice(0, dims)) {
        const plus = pts.map((p, j) => (j === i ? { ...p, [c]: p[c] + h } : p));
        const minus = pts.map((p, j) => (j === i ? { ...p, [c]: p[c] - h } : p));
        const d = which === "ref" ? (f(plus, cur) - f(minus, cur)) / (2 * h) : (f(ref, plus) - f(ref, minus)) / (2 * h);
        const s = pts[i][SIGMAS[c]];
        sum += d * d * s * s;
      }
    }
  }
  return Math.sqrt(sum);
}
