import { describe, expect, it } from "vitest";
import { parseEpochCsv, parseIsoTimeMs } from "../../../lib/formats/epoch-csv.ts";

function errorsOf(text: string) {
  const r = parseEpochCsv(text);
  if (r.ok) throw new Error("expected errors");
  return r.errors;
}

describe("parseEpochCsv", () => {
  it("parses required and optional columns in any order and case, with comments and blank lines", () => {
    const r = parseEpochCsv("# site A\nPoint,NORTH,east,Height,Sigma_East,time\nP1,5000000.5,500000.25,100,0.002,2024-03-01T09:00:00+01:00\n\n  # note\nP2,5000001,500001,101,,\n");
    expect(r).toEqual({
      ok: true,
      rows: [
        { line: 3, point: "P1", east: 500000.25, north: 5000000.5, height: 100, time: "2024-03-01T08:00:00.000Z", sigmaEast: 0.002, sigmaNorth: null, sigmaHeight: null },
        { line: 6, point: "P2", east: 500001, north: 5000001, height: 101, time: null, sigmaEast: null, sigmaNorth: null, sigmaHeight: null },
      ],
    });
  });
  it("counts lines inside quoted fields with newlines, as an editor shows them", () => {
    const errs = errorsOf('point,east,north,height\n"P\n1",1,2,3\nP2,x,2,3\n');
    expect(errs).toEqual([{ line: 4, field: "east", message: 'east is not a number: "x"' }]);
  });
  it("accepts RFC 4180 quoting with doubled quotes and CRLF line ends", () => {
    const r = parseEpochCsv('point,east,north,height\r\n"P ""1""","1.5",2,3\r\n');
    expect(r.ok && r.rows[0].point).toBe('P "1"');
  });
  it("reports every bad field with line and the column as written in the header", () => {
    const errs = errorsOf("Point,East,North,Height,Sigma_North\nP1,abc,2,NaN,0\nP2,1,Infinity,3,-1\nP3,1,2,1e999,0.001\n");
    expect(errs.map((e) => [e.line, e.field])).toEqual([
      [2, "East"],
      [2, "Height"],
      [2, "Sigma_North"],
      [3, "North"],
      [3, "Sigma_North"],
      [4, "Height"],
    ]);
  });
  it("rejects an unknown column, a missing required column and a duplicate column", () => {
    expect(errorsOf("point,east,north,height,colour\n")).toEqual([{ line: 1, field: "colour", message: expect.stringMatching(/unknown column/) }]);
    expect(errorsOf("point,east,north\nP1,1,2\n")).toEqual([{ line: 1, field: "height", message: expect.stringMatching(/missing/) }]);
    expect(errorsOf("point,east,north,height,EAST\n")[0]).toMatchObject({ line: 1, field: "EAST" });
  });
  it("rejects a point twice in one epoch but accepts it once per time (several epochs, a backfill)", () => {
    expect(errorsOf("point,east,north,height\nP1,1,2,3\nP1,1,2,3\n")).toEqual([{ line: 3, field: "point", message: expect.stringMatching(/twice.*line 2/) }]);
    const r = parseEpochCsv("point,east,north,height,time\nP1,1,2,3,2024-01-01T00:00:00Z\nP1,1,2,3,2024-01-02T00:00:00Z\n");
    expect(r.ok && r.rows.length).toBe(2);
    // The same instant written with two offsets is the same epoch.
    expect(errorsOf("point,east,north,height,time\nP1,1,2,3,2024-01-01T01:00:00+01:00\nP1,1,2,3,2024-01-01T00:00:00Z\n")[0]).toMatchObject({ line: 3, field: "point" });
  });
  it("rejects times without an offset or Z, and impossible dates", () => {
    expect(errorsOf("point,east,north,height,time\nP1,1,2,3,2024-01-01T00:00:00\n")[0]).toMatchObject({ line: 2, field: "time" });
    expect(errorsOf("point,east,north,height,time\nP1,1,2,3,2023-02-29T00:00:00Z\n")[0]).toMatchObject({ line: 2, field: "time" });
    expect(errorsOf("point,east,north,height,time\nP1,1,2,3,01/02/2024\n")[0]).toMatchObject({ line: 2, field: "time" });
  });
  it("uses opts.defaultTime for rows without a time", () => {
    const r = parseEpochCsv("point,east,north,height\nP1,1,2,3\n", { defaultTime: "2024-05-01T12:00:00-04:00" });
    expect(r.ok && r.rows[0].time).toBe("2024-05-01T16:00:00.000Z");
  });
  it("rejects rows with the wrong number of fields, an unclosed quote, an empty file", () => {
    expect(errorsOf("point,east,north,height\nP1,1,2\n")).toEqual([{ line: 2, field: null, message: expect.stringMatching(/expected 4 fields/) }]);
    expect(errorsOf('point,east,north,height\n"P1,1,2,3\n')[0]).toMatchObject({ line: 2, field: null });
    expect(errorsOf("")[0]).toMatchObject({ line: 1 });
  });
  it("caps errors at 100 and says how many more there were", () => {
    const body = Array.from({ length: 150 }, (_, i) => `P${i},x,2,3`).join("\n");
    const errs = errorsOf(`point,east,north,height\n${body}\n`);
    expect(errs).toHaveLength(101);
    expect(errs[100].message).toBe("50 more errors not shown");
  });
});

describe("parseIsoTimeMs", () => {
  it("reads Z, ±hh:mm, ±hhmm and fractional seconds (reference: Date.UTC)", () => {
    expect(parseIsoTimeMs("2024-03-01T08:15:00Z")).toBe(Date.UTC(2024, 2, 1, 8, 15));
    expect(parseIsoTimeMs("2024-03-01T08:15:00.250+0130")).toBe(Date.UTC(2024, 2, 1, 6, 45, 0, 250));
    expect(parseIsoTimeMs("2024-03-01T08:15-05:00")).toBe(Date.UTC(2024, 2, 1, 13, 15));
    expect(parseIsoTimeMs("2024-03-01 08:15:00Z")).toBeNull();
  });
});
