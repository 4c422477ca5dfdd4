/** The clean-file fast path of the CSV ingest parser agrees with the full parser (lib/formats/epoch-csv.ts). */
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { parseCleanEpochCsv, parseEpochCsvInput } from "../../../lib/server/ingest/csv-input.ts";
import { parseEpochCsv } from "../../../lib/formats/epoch-csv.ts";

const strip = (r: ReturnType<typeof parseEpochCsvInput>) =>
  r.ok ? { ok: true, epochs: r.epochs.map((e) => ({ time: e.time, timeAt: e.timeAt, observations: e.observations, east: e.fieldOf(0, "east") })) } : { ok: false };

describe("parseCleanEpochCsv", () => {
  it("parseCleanEpochCsv returns exactly what the full parser gives for random clean and dirty files, or defers (null)", () => {
    const cell = fc.oneof(
      fc.constantFrom("1", "-2.5", " 3.25 ", "1e3", "", "x", "NaN", "0", "-0.001", ".5", "1.", "2024-03-01T08:00:00Z", "2024-03-01T09:00:00+01:00", "2024-03-01T08:00:00", "P1", "P2", " P3", "#"),
      fc.string({ maxLength: 4 }),
    );
    const header = fc.constantFrom("point,east,north,height", "point,east,north,height,time", "Point,East,North,Height,Time,sigma_east", "point,east,north,height,sigma_height,time", "point,east,north", "point,east,east,height");
    // Mostly clean rows (so the fast path accepts often), sometimes one dirty cell.
    const num = fc.constantFrom("1", "-2.5", " 3.25 ", "1e3", "0", ".5", "1.", "2600000.12345");
    const time = fc.constantFrom("2024-03-01T08:00:00Z", "2024-03-01T09:00:00+01:00", "2024-03-01T08:15:00Z", "");
    const cleanRow = fc.tuple(fc.constantFrom("P1", "P2", " P3", "P4"), num, num, num, time, fc.constantFrom("0.001", "", "2")).map((r) => r.slice(0, 6));
    const row = fc.oneof({ weight: 4, arbitrary: cleanRow }, { weight: 1, arbitrary: fc.array(cell, { minLength: 4, maxLength: 6 }) });
    const file = fc.tuple(header, fc.array(row, { maxLength: 8 }), fc.constantFrom("\n", "\r\n", "\r"), fc.boolean()).map(([h, rows, nl, comment]) => {
      const w = h.split(",").length;
      return [...(comment ? ["# exported"] : []), h, ...rows.map((r) => (r.length === 6 ? r.slice(0, w) : r).join(","))].join(nl) + nl;
    });
    let accepted = 0;
    fc.assert(
      fc.property(file, fc.boolean(), (text, withDefault) => {
        const def = withDefault ? "2024-01-01T00:00:00.000Z" : null;
        const fast = parseCleanEpochCsv(text, def);
        if (fast === null) return true;
        accepted++;
        // Whatever the fast path accepts, the full parser accepts with the same rows.
        const full = parseEpochCsv(text, def ? { defaultTime: def } : {});
        expect(full.ok).toBe(true);
        if (!full.ok || !fast.ok) return false;
        const flat = fast.epochs.flatMap((e) => e.observations.map((o) => ({ ...o, time: e.time })));
        flat.sort((a, b) => a.line! - b.line!);
        expect(flat.map((o) => [o.line, o.point, o.east, o.north, o.height, o.sigmaEast, o.sigmaNorth, o.sigmaHeight, o.time])).toEqual(
          full.rows.map((r) => [r.line, r.point, r.east, r.north, r.height, r.sigmaEast, r.sigmaNorth, r.sigmaHeight, r.time ?? def]),
        );
        return true;
      }),
      { numRuns: 2000 },
    );
    // The comparison must have happened often enough to mean something.
    expect(accepted).toBeGreaterThan(100);
  });

  it("parseEpochCsvInput gives the same epochs through the fast path as through the full parser", () => {
    const text = "# c\nPoint,East,North,Height,Time\nA,1,2,3,2024-03-01T08:00:00Z\n\nB,4,5,6,2024-03-01T09:00:00+01:00\nA,1.5,2,3,2024-03-01T08:15:00Z\n";
    const viaFast = parseEpochCsvInput(text);
    const viaFull = parseEpochCsvInput(text.replace("A,1,2", '"A",1,2')); // a quote forces the full parser
    expect(parseCleanEpochCsv(text, null)).not.toBe(null);
    expect(strip(viaFast)).toEqual(strip(viaFull));
    expect(viaFast.ok && viaFast.epochs.map((e) => [e.time, e.observations.length, e.fieldOf(0, "east")])).toEqual([
      ["2024-03-01T08:00:00.000Z", 2, "East"],
      ["2024-03-01T08:15:00.000Z", 1, "East"],
    ]);
  });
});
