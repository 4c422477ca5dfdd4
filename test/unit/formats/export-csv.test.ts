import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { csvText, observationsCsv, OBSERVATION_CSV_COLUMNS, resultsCsv, RESULT_CSV_COLUMNS, type ExportResult } from "../../../lib/formats/export-csv.ts";
import { tokenizeCsv } from "../../../lib/formats/csv.ts";

const result = (over: Partial<ExportResult> = {}): ExportResult => ({
  timeMs: Date.UTC(2026, 5, 1, 6),
  element: "T1",
  kind: "triangle",
  mode: "plan",
  status: "ok",
  referenceTimeMs: Date.UTC(2026, 5, 1),
  greenMax: 0.00025,
  greenMin: -0.0001,
  maxShear: 0.00035,
  arealStrain: 0.00015,
  rotationDeg: -0.01,
  azimuthMaxDeg: 45,
  engineering: null,
  sigmaGreenMax: 0.0001,
  sigmaGreenMin: 0.0001,
  sigmaMaxShear: 0.00014,
  sigmaArealStrain: 0.0002,
  sigmaEngineering: null,
  ...over,
});

describe("observationsCsv", () => {
  it("observationsCsv writes units in the header, UTC times with Z and CRLF line ends", () => {
    const text = observationsCsv([{ timeMs: Date.UTC(2026, 5, 1, 6), point: "P1", eastM: 1000.1234567891, northM: 2000, heightM: -3.5, sigmaEastM: 0.001, sigmaNorthM: 0.001, sigmaHeightM: 0.0015 }]);
    expect(text).toBe("time_utc,point,east_m,north_m,height_m,sigma_east_m,sigma_north_m,sigma_height_m\r\n2026-06-01T06:00:00.000Z,P1,1000.1234567891,2000,-3.5,0.001,0.001,0.0015\r\n");
    expect(OBSERVATION_CSV_COLUMNS).toContain("east_m");
  });

  it("observationsCsv quotes codes with commas and quotes, and neutralises formula-leading codes", () => {
    const text = observationsCsv([
      { timeMs: 0, point: 'a,"b"', eastM: 1, northM: 2, heightM: 3, sigmaEastM: 1, sigmaNorthM: 1, sigmaHeightM: 1 },
      { timeMs: 0, point: "=HYPERLINK(1)", eastM: 1, northM: 2, heightM: 3, sigmaEastM: 1, sigmaNorthM: 1, sigmaHeightM: 1 },
    ]);
    const { records, errors } = tokenizeCsv(text);
    expect(errors).toEqual([]);
    expect(records[1].fields[1].value).toBe('a,"b"');
    expect(records[2].fields[1].value).toBe("'=HYPERLINK(1)");
  });

  it("observationsCsv numbers read back to the same doubles (property, shortest round-trip decimal)", () => {
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true }), (v) => {
        const text = observationsCsv([{ timeMs: 0, point: "P", eastM: v, northM: 0, heightM: 0, sigmaEastM: 1, sigmaNorthM: 1, sigmaHeightM: 1 }]);
        const cell = tokenizeCsv(text).records[1].fields[2].value;
        expect(Number(cell) + 0).toBe(v + 0);
      }),
      { numRuns: 500 },
    );
  });

  it("csvText leaves ordinary codes alone", () => {
    expect(csvText("GR-07")).toBe("GR-07");
    expect(csvText("-7")).toBe("'-7");
  });
});

describe("resultsCsv", () => {
  it("resultsCsv writes µε with σ and significance at k, and empty fields for quantities a kind does not have", () => {
    const text = resultsCsv([result(), result({ element: "B1", kind: "baseline", mode: "slope", greenMax: null, greenMin: null, maxShear: null, arealStrain: null, rotationDeg: null, azimuthMaxDeg: null, sigmaGreenMax: null, sigmaGreenMin: null, sigmaMaxShear: null, sigmaArealStrain: null, engineering: -0.0005, sigmaEngineering: 0.0002 })], 1.96);
    const { records } = tokenizeCsv(text);
    const head = records[0].fields.map((f) => f.value);
    expect(head).toEqual([...RESULT_CSV_COLUMNS]);
    const row = (i: number) => Object.fromEntries(head.map((h, k) => [h, records[i].fields[k].value]));
    const t = row(1);
    expect(t.green_max_microstrain).toBe("250");
    expect(t.sigma_green_max_microstrain).toBe("100");
    // |250| > 1.96 × 100 = 196 µε: significant; |−100| < 196: not (domain.md §4).
    expect(t.green_max_significant).toBe("true");
    expect(t.green_min_significant).toBe("false");
    expect(t.engineering_microstrain).toBe("");
    expect(t.reference_time_utc).toBe("2026-06-01T00:00:00.000Z");
    const b = row(2);
    expect(b.engineering_microstrain).toBe("-500");
    expect(b.engineering_significant).toBe("true");
    expect(b.green_max_microstrain).toBe("");
    expect(b.green_max_significant).toBe("");
  });

  it("resultsCsv writes a degenerate element's row with its status and no values", () => {
    const text = resultsCsv([result({ status: "degenerate", greenMax: null, sigmaGreenMax: null })], 1.96);
    const f = tokenizeCsv(text).records[1].fields.map((x) => x.value);
    expect(f[4]).toBe("degenerate");
    expect(f[6]).toBe("");
  });
});
