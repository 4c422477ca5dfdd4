/**
 * Every finite-strain measure of a 2D deformation gradient F = I + H (domain.md §3), from H so that
 * small strains keep their digits.
 */
import type { Mat2, PlanarMeasures, PlanarPrecision } from "./types.ts";
import { almansiFromGreen, greenFromH, mat2, smallFromH } from "./tensor2.ts";
import { principal2, principalAxes2 } from "./principal.ts";
import { polarRotationDeg } from "./polar.ts";
import { determinantGradient, eigenGradient, isSignificant, sigmaOfAffineFunction, subtractGradients, type AffineSensitivity } from "./precision.ts";

export interface PlanarMeasuresWithAxis extends PlanarMeasures {
  /** Angle of the greenMax axis from basis axis 0 toward axis 1, radians. */
  greenAxisRad: number;
}

/** Measures of F = I + H; the caller has checked det F > 0. */
export function planarMeasuresFromH(h: Mat2): PlanarMeasuresWithAxis {
  const f = mat2(1 + h[0][0], h[0][1], h[1][0], 1 + h[1][1]);
  const green = greenFromH(h);
  const small = smallFromH(h);
  const almansi = almansiFromGreen(f, green);
  const pg = principal2(green);
  const ps = principal2(small);
  // Principal stretches λ = √(1 + 2E); Almansi principal values ½(1 − λ⁻²) = E/(1 + 2E) (no cancellation).
  const stretchMax = Math.sqrt(1 + 2 * pg.max);
  const stretchMin = Math.sqrt(1 + 2 * pg.min);
  // ΔA/A = det F − 1 = tr H + det H, again without 1 − 1.
  const arealStrain = h[0][0] + h[1][1] + (h[0][0] * h[1][1] - h[0][1] * h[1][0]);
  return {
    F: f,
    green,
    almansi,
    small,
    greenMax: pg.max,
    greenMin: pg.min,
    almansiMax: pg.max / (1 + 2 * pg.max),
    almansiMin: pg.min / (1 + 2 * pg.min),
    smallMax: ps.max,
    smallMin: ps.min,
    stretchMax,
    stretchMin,
    maxShear: pg.max - pg.min,
    arealStrain,
    rotationDeg: polarRotationDeg(f),
    greenAxisRad: pg.angleRad,
  };
}

/** σ and significance of greenMax, greenMin, maxShear and arealStrain of an affine fit. */
export function planarAffinePrecision(m: PlanarMeasuresWithAxis, s: Omit<AffineSensitivity, "d" | "F">, k: number): PlanarPrecision {
  const f = Float64Array.of(m.F[0][0], m.F[0][1], m.F[1][0], m.F[1][1]);
  const sens: AffineSensitivity = { ...s, d: 2, F: f };
  const { major, minor } = principalAxes2(m.greenAxisRad);
  const gMax = eigenGradient(f, 2, major);
  const gMin = eigenGradient(f, 2, minor);
  const sigma = {
    greenMax: sigmaOfAffineFunction(sens, gMax),
    greenMin: sigmaOfAffineFunction(sens, gMin),
    maxShear: sigmaOfAffineFunction(sens, subtractGradients(gMax, gMin)),
    arealStrain: sigmaOfAffineFunction(sens, determinantGradient(f, 2)),
  };
  return {
    sigma,
    significant: {
      greenMax: isSignificant(m.greenMax, sigma.greenMax, k),
      greenMin: isSignificant(m.greenMin, sigma.greenMin, k),
      maxShear: isSignificant(m.maxShear, sigma.maxShear, k),
      arealStrain: isSignificant(m.arealStrain, sigma.arealStrain, k),
    },
  };
}

/** Drop the internal axis angle before a result leaves the engine. */
export function publicMeasures(m: PlanarMeasuresWithAxis): PlanarMeasures {
  const { greenAxisRad: _axis, ...rest } = m;
  return rest;
}

