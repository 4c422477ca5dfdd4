/** End-to-end: `node lib/server/cli/bin.mjs strain ...` on the files in test/fixtures/strain/. */
import { describe, expect, it } from "vitest";
import { spawnSync } from "node:child_process";
import { fileURLToPath } from "node:url";

const ROOT = fileURLToPath(new URL("../../../", import.meta.url));
const FIX = "test/fixtures/strain/";

function strain(...args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, ["lib/server/cli/bin.mjs", "strain", ...args], { cwd: ROOT, encoding: "utf8", timeout: 60_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

interface JsonElement {
  id: string;
  kind: string;
  mode: string;
  points: string[];
  status: string;
  message?: string;
  greenMax?: number;
  azimuthMaxDeg?: number | null;
  sigma?: Record<string, number>;
  significant?: Record<string, boolean>;
  engineering?: number;
}

describe("epochal strain (command line)", { timeout: 60_000 }, () => {
  it("--json without --elements triangulates the common points: 4 triangles of a 10 m grid stretched 1000 µε east", () => {
    const r = strain("--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--json");
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout) as { elements: JsonElement[] };
    expect(Object.keys(out)).toEqual(["elements"]);
    expect(out.elements).toHaveLength(4);
    for (const e of out.elements) {
      expect(e).toMatchObject({ kind: "triangle", mode: "plan", status: "ok" });
      expect(e.id).toBe(e.points.join("-"));
      expect(e.points[0] < e.points[1] && e.points[0] < e.points[2]).toBe(true);
      // x' = x + 0.001 (x − x0): Green ½(1.001² − 1) = 0.0010005 (derived analytically); the file rounds to 0.1 mm.
      expect(Math.abs((e.greenMax as number) - 0.0010005)).toBeLessThan(1e-8);
      expect(e.azimuthMaxDeg).toBeCloseTo(90, 4);
      // Default σ 1 mm: σ(greenMax) ≈ √2·σ/(10 m)·… for a right triangle — just positive and significant here.
      expect(e.sigma?.greenMax).toBeGreaterThan(0);
      expect(e.significant?.greenMax).toBe(true);
    }
  });

  it("--elements computes triangles, surface triangles, baselines, groups and tags degenerate and missing points", () => {
    const r = strain("--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--elements", FIX + "elements.csv", "--json");
    expect(r.status).toBe(0);
    const els = (JSON.parse(r.stdout) as { elements: JsonElement[] }).elements;
    const byId = new Map(els.map((e) => [e.id, e]));
    expect(byId.get("T2")).toMatchObject({ mode: "surface", status: "ok" });
    expect(byId.get("B1")).toMatchObject({ kind: "baseline", mode: "horizontal", status: "ok" });
    expect(byId.get("B2")).toMatchObject({ mode: "slope", status: "ok" });
    expect(Math.abs((byId.get("B1")?.engineering as number) - 0.001)).toBeLessThan(1e-9);
    expect(byId.get("G1")).toMatchObject({ kind: "group", status: "ok", redundancy: 6, pointsUsed: ["P1", "P2", "P3", "P4", "P5", "P6"] });
    expect(byId.get("X1")).toMatchObject({ status: "degenerate" });
    expect(byId.get("M1")).toMatchObject({ status: "missing-point", message: expect.stringMatching(/P9/) });
    expect(byId.get("M1")).not.toHaveProperty("greenMax");
  });

  it("--sigma applies where the file has no σ columns, and the file's columns win", () => {
    const base = JSON.parse(strain("--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--json").stdout) as { elements: JsonElement[] };
    const twice = JSON.parse(strain("--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--sigma", "0.002", "--json").stdout) as { elements: JsonElement[] };
    const fileSigma = JSON.parse(strain("--reference", FIX + "ref-sigma.csv", "--current", FIX + "cur.csv", "--sigma", "0.002", "--json").stdout) as { elements: JsonElement[] };
    const s0 = base.elements[0].sigma?.greenMax as number;
    expect(Math.abs((twice.elements[0].sigma?.greenMax as number) / s0 - 2)).toBeLessThan(1e-6);
    // Reference σ 0.5 mm from the file, current σ 2 mm from --sigma: √((0.25 + 4)/2) = 1.4577 × the 1 mm value.
    expect(Math.abs((fileSigma.elements[0].sigma?.greenMax as number) / s0 - Math.sqrt((0.25 + 4) / 2))).toBeLessThan(1e-3);
  });

  it("prints a table in µε with units in the headers without --json", () => {
    const r = strain("--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--elements", FIX + "elements.csv");
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/greenMax \(µε\)/);
    expect(r.stdout).toMatch(/engineering \(µε\)/);
    expect(r.stdout).toMatch(/1000\.0\*/);
  });

  it("exits 2 naming file, line and field for a non-number", () => {
    const r = strain("--reference", FIX + "bad-number.csv", "--current", FIX + "cur.csv");
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(`${FIX}bad-number.csv:3: field "north"`);
  });
  it("exits 2 for an unknown column, a duplicate point, a time without offset, a bad elements row, two epochs in one file", () => {
    const cases: [string[], string][] = [
      [["--reference", FIX + "bad-column.csv", "--current", FIX + "cur.csv"], `${FIX}bad-column.csv:1: field "colour"`],
      [["--reference", FIX + "ref.csv", "--current", FIX + "duplicate-point.csv"], `${FIX}duplicate-point.csv:4: field "point"`],
      [["--reference", FIX + "bad-time.csv", "--current", FIX + "cur.csv"], `${FIX}bad-time.csv:2: field "time"`],
      [["--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--elements", FIX + "bad-elements.csv"], `${FIX}bad-elements.csv:2: field "points"`],
      [["--reference", FIX + "two-epochs.csv", "--current", FIX + "cur.csv"], `${FIX}two-epochs.csv:3: field "time"`],
    ];
    for (const [args, msg] of cases) {
      const r = strain(...args);
      expect(r.status).toBe(2);
      expect(r.stderr).toContain(msg);
    }
  });
  it("exits 2 naming the option for a missing file, a bad option value, an unknown option, a missing --current", () => {
    const cases: [string[], RegExp][] = [
      [["--reference", FIX + "nope.csv", "--current", FIX + "cur.csv"], /nope\.csv.*--reference/],
      [["--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--confidence", "95"], /--confidence/],
      [["--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--sigma", "-1"], /--sigma/],
      [["--reference", FIX + "ref.csv", "--current", FIX + "cur.csv", "--frobnicate"], /--frobnicate/],
      [["--reference", FIX + "ref.csv"], /--current/],
    ];
    for (const [args, re] of cases) {
      const r = strain(...args);
      expect(r.status).toBe(2);
      expect(r.stderr).toMatch(re);
    }
  });
  it("--help prints the options and exits 0", () => {
    const r = strain("--help");
    expect(r.status).toBe(0);
    for (const opt of ["--reference", "--current", "--elements", "--sigma", "--sigma-v", "--confidence", "--json"]) expect(r.stdout).toContain(opt);
  });
});
