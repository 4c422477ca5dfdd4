import { describe, expect, it } from "vitest";
import { parseElementsCsv } from "../../../lib/formats/elements-csv.ts";

describe("parseElementsCsv", () => {
  it("parses kinds, default modes and space-separated points", () => {
    const r = parseElementsCsv("element,kind,points,mode\nT1,triangle,P1 P2  P3,\nB1,baseline,P1 P2,horizontal\nB2,baseline,P1 P3,\nG1,group,P1 P2 P3 P4,volume\n");
    expect(r).toEqual({
      ok: true,
      elements: [
        { line: 2, id: "T1", kind: "triangle", mode: "plan", points: ["P1", "P2", "P3"] },
        { line: 3, id: "B1", kind: "baseline", mode: "horizontal", points: ["P1", "P2"] },
        { line: 4, id: "B2", kind: "baseline", mode: "slope", points: ["P1", "P3"] },
        { line: 5, id: "G1", kind: "group", mode: "volume", points: ["P1", "P2", "P3", "P4"] },
      ],
    });
  });
  it("works without a mode column", () => {
    const r = parseElementsCsv("Element,Kind,Points\nT1,triangle,A B C\n");
    expect(r.ok && r.elements[0].mode).toBe("plan");
  });
  it("reports wrong point counts, repeated points, bad kinds and modes, duplicate ids by line and field", () => {
    const r = parseElementsCsv("element,kind,points,mode\nT1,triangle,A B,\nT2,triangle,A A B,\nT3,Triangle,A B C,\nT4,baseline,A B,plan\nT4,group,A B C D,volume\nG1,group,A B C,volume\n");
    if (r.ok) throw new Error("expected errors");
    expect(r.errors.map((e) => [e.line, e.field])).toEqual([
      [2, "points"],
      [3, "points"],
      [4, "kind"],
      [5, "mode"],
      [6, "element"],
      [7, "points"],
    ]);
  });
  it("rejects an unknown column", () => {
    const r = parseElementsCsv("element,kind,points,colour\n");
    expect(!r.ok && r.errors[0]).toMatchObject({ line: 1, field: "colour" });
  });
});
