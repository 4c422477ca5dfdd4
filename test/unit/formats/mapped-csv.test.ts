import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { applyColumnMapping, parseMappedTime, previewColumns, sourceLineOf, suggestMapping, type ColumnMapping } from "../../../lib/formats/mapped-csv.ts";
import { parseEpochCsv } from "../../../lib/formats/epoch-csv.ts";
import { observationsCsv, type ExportObservation } from "../../../lib/formats/export-csv.ts";

const base: ColumnMapping = { hasHeader: true, columns: {}, coordinateUnit: "m", sigmaUnit: "m", timeFormat: "iso", timePattern: null, timeZone: null };

describe("applyColumnMapping", () => {
  it("applyColumnMapping reorders renamed columns, converts mm to m and writes our epoch CSV that parseEpochCsv reads", () => {
    const text = ["# logger export", "Stamp;ignored,Other,Y_mm,X_mm,Name,Z_mm,sE", "2026-03-01T08:00:00+01:00,x,2000500,1000250,P1,100125,1.5", "2026-03-01T08:00:00+01:00,x,2000000,1010000,P2,100000,"].join("\n");
    const m: ColumnMapping = { ...base, coordinateUnit: "mm", sigmaUnit: "mm", columns: { point: "name", east: "X_mm", north: "Y_mm", height: "Z_mm", time: "Stamp;ignored", sigmaEast: "sE" } };
    const r = applyColumnMapping(text, m);
    expect(r.errors).toEqual([]);
    expect(r.rows.map((x) => [x.sourceLine, x.point, x.east, x.north, x.height, x.sigmaEast])).toEqual([
      [3, "P1", 1000.25, 2000.5, 100.125, 0.0015],
      [4, "P2", 1010, 2000, 100, null],
    ]);
    expect(r.rows[0].time).toBe("2026-03-01T07:00:00.000Z");
    expect(r.lineMap).toEqual([0, 2, 3, 4]);
    const parsed = parseEpochCsv(r.csv as string);
    expect(parsed.ok).toBe(true);
    if (parsed.ok) expect(parsed.rows.map((x) => [x.point, x.east, x.sigmaEast, x.time])).toEqual([["P1", 1000.25, 0.0015, "2026-03-01T07:00:00.000Z"], ["P2", 1010, null, "2026-03-01T07:00:00.000Z"]]);
  });

  it("applyColumnMapping names the source line and source column of a bad number, and keeps the good rows for the preview", () => {
    const text = "id,e,n,h\nA,1,2,3\nB,1,zwei,3\n\nC,1,2,\n";
    const r = applyColumnMapping(text, { ...base, columns: { point: "id", east: "e", north: "n", height: "h" } });
    expect(r.csv).toBeNull();
    expect(r.rows.map((x) => x.point)).toEqual(["A"]);
    expect(r.errors).toEqual([
      { line: 3, field: "n", message: 'n is not a number: "zwei"' },
      { line: 5, field: "h", message: "h is empty" },
    ]);
  });

  it("applyColumnMapping picks columns by position in a file without a header", () => {
    const r = applyColumnMapping("P1 ,5,6,7\nP2,8,9,10\n", { ...base, hasHeader: false, columns: { point: 1, east: 3, north: 2, height: 4 } });
    expect(r.errors).toEqual([]);
    expect(r.rows.map((x) => [x.sourceLine, x.point, x.east, x.north])).toEqual([[1, "P1", 6, 5], [2, "P2", 9, 8]]);
    expect(r.csv).toBe("point,east,north,height\nP1,6,5,7\nP2,9,8,10\n");
    expect(r.lineMap).toEqual([0, 0, 1, 2]);
  });

  it("applyColumnMapping refuses a mapping with a missing required field, an unknown column or one column twice", () => {
    const head = "a,b,c,d\n1,2,3,4\n";
    expect(applyColumnMapping(head, { ...base, columns: { point: "a", east: "b", north: "c" } }).errors).toEqual([{ line: 1, field: "height", message: "no column is picked for height" }]);
    expect(applyColumnMapping(head, { ...base, columns: { point: "a", east: "b", north: "c", height: "zz" } }).errors[0].message).toBe('the file has no column "zz"');
    expect(applyColumnMapping(head, { ...base, columns: { point: "a", east: "b", north: "b", height: "d" } }).errors[0].message).toBe("b is picked for both east and north");
    expect(applyColumnMapping(head, { ...base, hasHeader: false, columns: { point: "a", east: 2, north: 3, height: 4 } }).errors[0].message).toMatch(/no header row/);
  });

  it("applyColumnMapping reports a short row and an empty point code at their lines", () => {
    const r = applyColumnMapping("p,e,n,h\n,1,2,3\nX,1\n", { ...base, columns: { point: "p", east: "e", north: "n", height: "h" } });
    expect(r.errors.map((e) => [e.line, e.field])).toEqual([[2, "p"], [3, null]]);
  });

  it("applyColumnMapping quotes codes that would read as comments or hold commas", () => {
    const r = applyColumnMapping('p,e,n,h\n"#7",1,2,3\n"a,b",1,2,3\n', { ...base, columns: { point: "p", east: "e", north: "n", height: "h" } });
    expect(r.csv).toBe('point,east,north,height\n"#7",1,2,3\n"a,b",1,2,3\n');
    const back = parseEpochCsv(r.csv as string);
    expect(back.ok && back.rows.map((x) => x.point)).toEqual(["#7", "a,b"]);
  });

  it("applyColumnMapping(observationsCsv(rows)) reads back the same coordinates bit for bit (property)", () => {
    const coord = fc.double({ min: -1e6, max: 1e6, noNaN: true, noDefaultInfinity: true });
    const sigma = fc.double({ min: 1e-5, max: 1, noNaN: true });
    const row = fc.record({ point: fc.stringMatching(/^[A-Za-z0-9_.]{1,12}$/), eastM: coord, northM: coord, heightM: fc.double({ min: -1e4, max: 1e4, noNaN: true }), sigmaEastM: sigma, sigmaNorthM: sigma, sigmaHeightM: sigma });
    fc.assert(
      fc.property(fc.uniqueArray(row, { minLength: 1, maxLength: 20, selector: (r) => r.point }), fc.integer({ min: Date.UTC(1990, 0, 1), max: Date.UTC(2030, 0, 1) }), (rows, t) => {
        const obs: ExportObservation[] = rows.map((r) => ({ ...r, timeMs: t }));
        const m: ColumnMapping = { ...base, columns: { point: "point", east: "east_m", north: "north_m", height: "height_m", time: "time_utc", sigmaEast: "sigma_east_m", sigmaNorth: "sigma_north_m", sigmaHeight: "sigma_height_m" } };
        const r = applyColumnMapping(observationsCsv(obs), m);
        expect(r.errors).toEqual([]);
        const parsed = parseEpochCsv(r.csv as string);
        expect(parsed.ok).toBe(true);
        if (!parsed.ok) return;
        parsed.rows.forEach((p, i) => {
          expect(p.point).toBe(obs[i].point);
          // + 0 folds −0 into 0: the shortest decimal of −0 is "0" (ECMAScript Number::toString).
          expect(p.east + 0).toBe(obs[i].eastM + 0);
          expect(p.north + 0).toBe(obs[i].northM + 0);
          expect(p.height + 0).toBe(obs[i].heightM + 0);
          expect(p.sigmaEast).toBe(obs[i].sigmaEastM);
          expect(p.time).toBe(new Date(t).toISOString());
        });
      }),
      { numRuns: 150 },
    );
  });
});

describe("parseMappedTime", () => {
  it("parseMappedTime reads local ISO and luxon patterns in the given zone, across a summer-time change", () => {
    // Europe/Zurich: CET (+01:00) until 2026-03-29 01:00 UTC, then CEST (+02:00) (IANA tz database).
    expect(parseMappedTime("2026-03-28T12:00:00", { timeFormat: "iso-local", timeZone: "Europe/Zurich" })).toBe(Date.UTC(2026, 2, 28, 11));
    expect(parseMappedTime("30.03.2026 12:00", { timeFormat: "pattern", timePattern: "dd.MM.yyyy HH:mm", timeZone: "Europe/Zurich" })).toBe(Date.UTC(2026, 2, 30, 10));
    expect(parseMappedTime("1767225600", { timeFormat: "unix-s" })).toBe(Date.UTC(2026, 0, 1));
    expect(parseMappedTime("1767225600000", { timeFormat: "unix-ms" })).toBe(Date.UTC(2026, 0, 1));
  });

  it("parseMappedTime explains a time without offset, a wrong pattern and an unknown zone", () => {
    expect(parseMappedTime("2026-03-28T12:00:00", { timeFormat: "iso" })).toMatch(/with an offset or Z/);
    expect(parseMappedTime("2026-03-28", { timeFormat: "pattern", timePattern: "dd.MM.yyyy", timeZone: "UTC" })).toMatch(/does not match the pattern/);
    expect(parseMappedTime("2026-03-28T12:00", { timeFormat: "iso-local", timeZone: "Mars/Olympus" })).toMatch(/not an IANA zone/);
  });
});

describe("suggestMapping, previewColumns, sourceLineOf", () => {
  it("suggestMapping guesses common names and millimetres, and never picks one column twice", () => {
    const m = suggestMapping(["Point ID", "Easting (mm)", "Northing (mm)", "Elevation (mm)", "Date/Time", "E"]);
    expect(m.columns).toEqual({ point: "Point ID", east: "Easting (mm)", north: "Northing (mm)", height: "Elevation (mm)", time: "Date/Time" });
    expect(m.coordinateUnit).toBe("mm");
  });

  it("previewColumns gives the header and the first rows", () => {
    expect(previewColumns("a,b\n1,2\n3,4\n5,6\n", 2)).toEqual({ header: ["a", "b"], sample: [["1", "2"], ["3", "4"]], syntaxErrors: [] });
  });

  it("sourceLineOf maps a converted line back and gives null for lines it does not know", () => {
    expect(sourceLineOf([0, 2, 5, 9], 3)).toBe(9);
    expect(sourceLineOf([0, 2, 5, 9], 7)).toBeNull();
    expect(sourceLineOf([0, 0, 1], 1)).toBeNull();
    expect(sourceLineOf([0, 2], null)).toBeNull();
  });
});
