import { describe, expect, it } from "vitest";
import { computeElementStrain } from "../../../lib/strain/element.ts";
import { EMPTY_STORED_VALUES, STORED_VALUE_KEYS, storedValuesOf } from "../../../lib/strain/stored-values.ts";
import type { SurveyPoint } from "../../../lib/strain/types.ts";

const p = (east: number, north: number, height = 0): SurveyPoint => ({ east, north, height, sigmaEast: 0.001, sigmaNorth: 0.001, sigmaHeight: 0.0015 });

describe("storedValuesOf", () => {
  it("maps a plan triangle under uniaxial stretch λ = 1.1 along East to greenMax 0.105 and greenMin 0 (derived analytically, domain.md §8)", () => {
    const ref = new Map([["A", p(0, 0)], ["B", p(10, 0)], ["C", p(0, 10)]]);
    const cur = new Map([["A", p(0, 0)], ["B", p(11, 0)], ["C", p(0, 10)]]);
    const { status, values } = storedValuesOf(computeElementStrain({ id: "t", kind: "triangle", mode: "plan", points: ["A", "B", "C"] }, ref, cur));
    expect(status).toBe("ok");
    expect(values.greenMax).toBeCloseTo(0.105, 12);
    expect(values.greenMin).toBeCloseTo(0, 12);
    expect(values.arealStrain).toBeCloseTo(0.1, 12); // det F − 1 = 1.1 − 1
    expect(values.azimuthMaxDeg).toBeCloseTo(90, 9); // major axis along East: grid azimuth 90°
    expect(values.engineering).toBeNull();
    expect(values.sigmaGreenMax).toBeGreaterThan(0);
  });

  it("maps a baseline to its engineering strain and σ only", () => {
    const ref = new Map([["A", p(0, 0)], ["B", p(10, 0)]]);
    const cur = new Map([["A", p(0, 0)], ["B", p(11, 0)]]);
    const { status, values } = storedValuesOf(computeElementStrain({ id: "b", kind: "baseline", mode: "horizontal", points: ["A", "B"] }, ref, cur));
    expect(status).toBe("ok");
    expect(values.engineering).toBeCloseTo(0.1, 12); // (l − L)/L = (11 − 10)/10
    expect(values.sigmaEngineering).toBeGreaterThan(0);
    expect(values.greenMax).toBeNull();
  });

  it("maps a degenerate or incomplete element to its status with every value null", () => {
    const ref = new Map([["A", p(0, 0)], ["B", p(10, 0)], ["C", p(20, 0)]]);
    const r = storedValuesOf(computeElementStrain({ id: "c", kind: "triangle", mode: "plan", points: ["A", "B", "C"] }, ref, ref));
    expect(r.status).toBe("degenerate");
    expect(r.values).toEqual(EMPTY_STORED_VALUES);
    const m = storedValuesOf(computeElementStrain({ id: "m", kind: "triangle", mode: "plan", points: ["A", "B", "X"] }, ref, ref));
    expect(m.status).toBe("missing-point");
    for (const k of STORED_VALUE_KEYS) expect(m.values[k]).toBeNull();
  });
});
