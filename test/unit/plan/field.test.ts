import { describe, expect, it } from "vitest";
import { packField, planDisplacement, quantityValue, round6, unpackField, type FieldElement, type StrainField } from "../../../lib/plan/field.ts";

const el = (id: number, over: Partial<FieldElement> = {}): FieldElement => ({
  id,
  status: "ok",
  greenMax: 4.123456789e-4,
  greenMin: -1.5e-4,
  maxShear: 5.623456789e-4,
  arealStrain: 2.6e-4,
  rotationDeg: 0.0012345678,
  azimuthMaxDeg: 33.33333333,
  engineering: null,
  sigmaGreenMax: 1.1e-4,
  sigmaGreenMin: 1.2e-4,
  sigmaMaxShear: 1.3e-4,
  sigmaArealStrain: 1.4e-4,
  sigmaEngineering: null,
  ...over,
});

describe("packField / unpackField", () => {
  it("unpackField(packField(f)) returns the field with numbers to 6 significant digits and displacements to 0.01 mm", () => {
    const f: StrainField = {
      mode: "cumulative",
      epoch: { id: 2, timeMs: 1000 },
      from: { id: 1, timeMs: 0 },
      k: 1.96,
      elements: [el(1), el(2, { status: "missing-point", greenMax: null, greenMin: null })],
      points: [{ code: "A", dE: 0.0012345678, dN: -0.002, dH: 0.0000049, significant: true }],
    };
    const back = unpackField(JSON.parse(JSON.stringify(packField(f))));
    expect(back.elements).toHaveLength(2);
    expect(back.elements[0].greenMax).toBe(4.12346e-4);
    expect(Math.abs(back.elements[0].greenMax! - 4.123456789e-4) / 4.123456789e-4).toBeLessThan(5e-6);
    expect(back.elements[1]).toMatchObject({ id: 2, status: "missing-point", greenMax: null, engineering: null });
    expect(back.points[0]).toEqual({ code: "A", dE: 0.00123, dN: -0.002, dH: 0, significant: true });
    expect(back.epoch).toEqual(f.epoch);
  });

  it("round6 keeps nulls and drops non-finite values", () => {
    expect(round6(null)).toBeNull();
    expect(round6(NaN)).toBeNull();
    expect(round6(123456789)).toBe(123457000);
  });
});

describe("quantityValue / planDisplacement", () => {
  it("quantityValue gives a baseline's engineering strain for any strain quantity and flags significance at k·σ", () => {
    const b = el(3, { engineering: 3e-4, sigmaEngineering: 1e-4 });
    expect(quantityValue(b, "baseline", "greenMax", 1.96)).toEqual({ value: 3e-4, sigma: 1e-4, significant: true, axial: true });
    expect(quantityValue(b, "baseline", "rotationDeg", 1.96).value).toBeNull();
    const t = quantityValue(el(4), "triangle", "greenMin", 1.96);
    expect(t).toEqual({ value: -1.5e-4, sigma: 1.2e-4, significant: false, axial: false });
    expect(quantityValue(el(4), "triangle", "rotationDeg", 1.96).significant).toBeNull();
  });

  it("planDisplacement tests d against χ²(2) = 5.991 with the σ of both epochs", () => {
    const s = { sigmaEast: 0.001, sigmaNorth: 0.001 };
    // 3.5 mm east with σ_d = √2 mm: d²/σ² = 6.125 > 5.991 (domain.md §4).
    const d = planDisplacement({ east: 0, north: 0, height: 0, ...s }, { east: 0.0035, north: 0, height: 0.001, ...s });
    expect(d.significant).toBe(true);
    expect(d.dH).toBeCloseTo(0.001, 12);
    const e = planDisplacement({ east: 0, north: 0, height: 0, ...s }, { east: 0.0034, north: 0, height: 0, ...s });
    expect(e.significant).toBe(false);
  });
});
