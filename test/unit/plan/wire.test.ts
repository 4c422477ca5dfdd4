import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { decodePlanData, encodePlanData, fromDeltas, toDeltas, type PlanData } from "../../../lib/plan/wire.ts";
import { packField, unpackField, type StrainField } from "../../../lib/plan/field.ts";

const field: StrainField = {
  mode: "cumulative",
  epoch: { id: 12, timeMs: 1_735_711_200_000 + 21_600_000 },
  from: { id: 11, timeMs: 1_735_711_200_000 },
  k: 1.96,
  elements: [
    { id: 7, status: "ok", greenMax: 1.234567e-4, greenMin: -2e-5, maxShear: 1.4e-4, arealStrain: 1e-4, rotationDeg: 0.01, azimuthMaxDeg: 33.3, engineering: null, sigmaGreenMax: 9e-5, sigmaGreenMin: 9e-5, sigmaMaxShear: 1e-4, sigmaArealStrain: 1e-4, sigmaEngineering: null },
    { id: 9, status: "ok", greenMax: null, greenMin: null, maxShear: null, arealStrain: null, rotationDeg: null, azimuthMaxDeg: null, engineering: -3e-5, sigmaGreenMax: null, sigmaGreenMin: null, sigmaMaxShear: null, sigmaArealStrain: null, sigmaEngineering: 2e-5 },
  ],
  points: [{ code: "A1", dE: 0.001, dN: -0.002, dH: 0.0005, significant: false }],
};

const data: PlanData = {
  points: [
    { code: "A1", east: -12.3456, north: 4.5, isReference: true },
    { code: "B 2", east: 10, north: -0.0001, isReference: false },
    { code: 'C"3', east: 0, north: 7.25, isReference: false },
  ],
  elements: [
    { id: 7, name: 'A1-B 2-C"3', kind: "triangle", mode: "plan", pointCodes: ["A1", "B 2", 'C"3'] },
    { id: 9, name: "Gable baseline", kind: "baseline", mode: "slope", pointCodes: ["A1", "C\"3"] },
    { id: 10, name: "north wall", kind: "triangle", mode: "surface", pointCodes: ["A1", "B 2", 'C"3'] },
  ],
  epochIds: [11, 12],
  epochTimesMs: [1_735_711_200_000, 1_735_711_200_000 + 21_600_000],
  field,
};

describe("encodePlanData / decodePlanData", () => {
  it("decodePlanData(encodePlanData(d)) gives back points, elements (names, kinds, modes, point codes) and epochs exactly", () => {
    const back = decodePlanData(encodePlanData(data));
    expect(back.points).toEqual(data.points);
    expect(back.elements).toEqual(data.elements);
    expect(back.epochIds).toEqual(data.epochIds);
    expect(back.epochTimesMs).toEqual(data.epochTimesMs);
  });

  it("carries the field as packField/unpackField do (the same rounding as the field route)", () => {
    const back = decodePlanData(encodePlanData(data));
    expect(back.field).toEqual(unpackField(JSON.parse(JSON.stringify(packField(field)))));
    expect(decodePlanData(encodePlanData({ ...data, field: null })).field).toBeNull();
  });

  it("drops point codes of an element that are not among the points, and keeps its stored name", () => {
    const d: PlanData = { ...data, elements: [{ id: 3, name: "A1-B 2-X", kind: "triangle", mode: "plan", pointCodes: ["A1", "B 2", "X"] }] };
    expect(decodePlanData(encodePlanData(d)).elements).toEqual([{ id: 3, name: "A1-B 2-X", kind: "triangle", mode: "plan", pointCodes: ["A1", "B 2"] }]);
  });

  it("an empty site encodes and decodes to empty lists", () => {
    const empty: PlanData = { points: [], elements: [], epochIds: [], epochTimesMs: [], field: null };
    expect(decodePlanData(encodePlanData(empty))).toEqual(empty);
  });

  it("is smaller than the same data as one object per point and element", () => {
    const objects = JSON.stringify({ points: data.points, elements: data.elements, epochIds: data.epochIds, epochTimesMs: data.epochTimesMs });
    const wire = JSON.parse(encodePlanData({ ...data, field: null })) as Record<string, unknown>;
    expect(JSON.stringify(wire).length).toBeLessThan(objects.length);
  });
});

describe("toDeltas / fromDeltas", () => {
  it("consecutive ids become a run of ones after the first", () => {
    expect(toDeltas([41, 42, 43, 44])).toEqual([41, 1, 1, 1]);
  });

  it("fromDeltas(toDeltas(v)) is v for any integers (UTC milliseconds of any order included)", () => {
    fc.assert(
      fc.property(fc.array(fc.integer({ min: -(2 ** 45), max: 2 ** 45 })), (v) => {
        expect(fromDeltas(toDeltas(v))).toEqual(v);
      }),
    );
  });
});
