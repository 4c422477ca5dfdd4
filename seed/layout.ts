/**
 * Demo scenario layout: the site, the geometry of the pit, the terrace gables and the retaining
 * wall, the placement of every target and the hand-made structural elements (see seed/scenario.ts).
 */
import type { Random } from "./random.ts";
import type { ScenarioElement, ScenarioPoint, ScenarioSite } from "./scenario-types.ts";

export const SITE: ScenarioSite = {
  slug: "copperwick-lane",
  name: "Copperwick Lane station box",
  description:
    "Invented demo site: a deep excavation for a new underground station beside Nos. 12–26 Ashwend Row (old masonry terrace) and the Ashwend Row retaining wall.",
  timeZone: "Europe/London",
  frameDescription: "Copperwick Lane local site grid: x = Easting, y = Northing, z = Height (m)",
  sigmaHM: 0.001,
  sigmaVM: 0.0015,
  // Invented origin in the open North Sea; the local grid is east-north-up metres about it.
  originLatDeg: 54.35,
  originLonDeg: 2.95,
  originHeightM: 0,
};

/** Geometry of the pit: centreline N, west and east ends E, width B (m). */
export const PIT = { centreNorth: 7120, westEast: 4150, eastEast: 4270, widthM: 24 } as const;
/** Gables: plane E, south and north ends N, target rows above ground (m). */
export const GABLES = {
  "house-12": { label: "No. 12", east: 4186, southNorth: 7138, northNorth: 7154, prefix: "H12" },
  "house-26": { label: "No. 26", east: 4234, southNorth: 7138, northNorth: 7154, prefix: "H26" },
} as const;
const GABLE_ROWS_M = [1.0, 6.0, 11.0];
const GABLE_COLUMNS = 4;
export const WALL = { north: 7086, westEast: 4120, spacingM: 10, count: 17, crestHeight: 46.8, joints: [4165, 4205, 4245] } as const;

function groundHeight(e: number, n: number): number {
  return 48 + 0.012 * (e - 4200) - 0.01 * (n - 7130) + 0.6 * Math.sin((e - 4000) / 37) * Math.cos((n - 7000) / 29);
}

function pad(n: number, width: number): string {
  return String(n).padStart(width, "0");
}

/** Ground targets on a jittered staggered lattice around the pit, clear of the pit, the terrace and the wall. */
export function groundPoints(rnd: Random): ScenarioPoint[] {
  const out: ScenarioPoint[] = [];
  const dE = 13.5;
  const dN = 12;
  let row = 0;
  for (let n = 7092; n <= 7176; n += dN, row++) {
    for (let e = 4108 + (row % 2) * (dE / 2); e <= 4312; e += dE) {
      const pe = e + (rnd.uniform() - 0.5) * 3;
      const pn = n + (rnd.uniform() - 0.5) * 3;
      const inPit = pe > PIT.westEast - 2.5 && pe < PIT.eastEast + 2.5 && Math.abs(pn - PIT.centreNorth) < PIT.widthM / 2 + 2.5;
      const inTerrace = pe > GABLES["house-12"].east - 2 && pe < GABLES["house-26"].east + 2 && pn > GABLES["house-12"].southNorth - 2 && pn < GABLES["house-12"].northNorth + 2;
      const onWall = Math.abs(pn - WALL.north) < 3;
      if (inPit || inTerrace || onWall) continue;
      out.push({ code: "", kind: "prism", group: "ground", isReference: false, note: null, east: pe, north: pn, height: groundHeight(pe, pn) });
    }
  }
  // Number from west to east, south to north within 10 m strips, so that neighbours have near codes.
  out.sort((p, q) => Math.round(p.east / 10) - Math.round(q.east / 10) || p.north - q.north);
  out.forEach((p, i) => (p.code = `G${pad(i + 1, 3)}`));
  return out;
}

export function gablePoints(group: "house-12" | "house-26"): ScenarioPoint[] {
  const g = GABLES[group];
  const out: ScenarioPoint[] = [];
  GABLE_ROWS_M.forEach((h, r) => {
    for (let c = 0; c < GABLE_COLUMNS; c++) {
      const n = g.southNorth + ((g.northNorth - g.southNorth) * c) / (GABLE_COLUMNS - 1);
      out.push({
        code: `${g.prefix}-${pad(r * GABLE_COLUMNS + c + 1, 2)}`,
        kind: "prism",
        group,
        isReference: false,
        note: `${g.label} Ashwend Row, gable, row ${r + 1} of 3, column ${c + 1} of 4 from the pit side`,
        east: g.east,
        north: n,
        height: groundHeight(g.east, n) + h,
      });
    }
  });
  return out;
}

export function wallPoints(): ScenarioPoint[] {
  const out: ScenarioPoint[] = [];
  for (let k = 0; k < WALL.count; k++) {
    const e = WALL.westEast + k * WALL.spacingM;
    out.push({ code: `W${pad(k + 1, 2)}`, kind: "prism", group: "wall", isReference: false, note: "Ashwend Row retaining wall, crest", east: e, north: WALL.north, height: WALL.crestHeight + 0.004 * (e - 4200) });
  }
  return out;
}

export function referencePoints(): ScenarioPoint[] {
  const spots: [number, number, number, string][] = [
    [4012, 7008, 44.2, "pillar in the recreation ground"],
    [4392, 7012, 41.7, "pillar by the depot gate"],
    [4008, 7288, 57.9, "bracket on the chapel tower"],
    [4205, 7296, 55.3, "bracket on the water tower"],
    [4396, 7284, 52.6, "pillar on the allotments"],
    [4030, 7150, 49.4, "bracket on the school"],
  ];
  return spots.map(([e, n, h, note], k) => ({ code: `REF${k + 1}`, kind: "prism" as const, group: "reference" as const, isReference: true, note: `Stable reference: ${note}`, east: e, north: n, height: h }));
}

/** Hand-made gable elements on a 4 × 3 grid of targets: row baselines and surface triangles (angles ≥ 26°). */
export function gableElements(group: "house-12" | "house-26"): ScenarioElement[] {
  const g = GABLES[group];
  const id = (c: number, r: number) => `${g.prefix}-${pad(r * GABLE_COLUMNS + c + 1, 2)}`;
  const tri: [string, [number, number][]][] = [
    ["full gable, lower", [[0, 0], [3, 0], [3, 2]]],
    ["full gable, upper", [[0, 0], [3, 2], [0, 2]]],
    ["pit half, lower", [[0, 0], [2, 0], [2, 2]]],
    ["pit half, upper", [[0, 0], [2, 2], [0, 2]]],
    ["far half, lower", [[1, 0], [3, 0], [3, 2]]],
    ["far half, upper", [[1, 0], [3, 2], [1, 2]]],
  ];
  const name = g.label.replace(/[^0-9A-Za-z]/g, "");
  // Horizontal baselines along each row of targets: the horizontal strain that damage criteria use.
  const rows: ScenarioElement[] = GABLE_ROWS_M.map((h, r) => ({
    name: `${name}-B${r + 1}`,
    label: `${g.label} gable, row ${r + 1} (${h} m up), full width`,
    kind: "baseline" as const,
    mode: "horizontal" as const,
    pointCodes: [id(0, r), id(GABLE_COLUMNS - 1, r)],
    structure: group,
  }));
  return [...rows, ...tri.map(([what, v], k) => ({
    name: `${name}-T${k + 1}`,
    label: `${g.label} gable, ${what}`,
    kind: "triangle" as const,
    mode: "surface" as const,
    pointCodes: v.map(([c, r]) => id(c, r)),
    structure: group,
  }))];
}

export function wallElements(points: ScenarioPoint[]): ScenarioElement[] {
  const out: ScenarioElement[] = [];
  for (let k = 0; k + 1 < points.length; k++) {
    const a = points[k];
    const b = points[k + 1];
    const joint = WALL.joints.some((j) => j > a.east && j < b.east);
    out.push({ name: `${a.code}-${b.code}`, label: `Retaining wall crest ${a.code}–${b.code}${joint ? " (across a movement joint)" : ""}`, kind: "baseline", mode: "horizontal", pointCodes: [a.code, b.code], structure: "wall" });
  }
  return out;
}
