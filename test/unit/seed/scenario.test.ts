/**
 * The demo scenario generator: reproducible for a seed, the site the issue asks for (about 150 targets,
 * six months at a 6-hour cycle), a trough that deepens and widens with the dig, noise at the site's σ.
 */
import { describe, expect, it } from "vitest";
import {
  ACCELERATION,
  CYCLE_S,
  DEFAULT_START,
  SITE,
  generateScenario,
  modelDisplacement,
  temperatureChangeK,
  troughAt,
  type Scenario,
  type ScenarioPoint,
} from "../../../seed/scenario.ts";
import { createRandom } from "../../../seed/random.ts";

const sc: Scenario = generateScenario();
const byCode = new Map(sc.points.map((p) => [p.code, p]));
const endDays = ((sc.epochs.length - 1) * CYCLE_S) / 86400;

function sd(xs: number[]): number {
  const m = xs.reduce((s, x) => s + x, 0) / xs.length;
  return Math.sqrt(xs.reduce((s, x) => s + (x - m) ** 2, 0) / (xs.length - 1));
}

function observed(code: string): { k: number; east: number; north: number; height: number }[] {
  const out: { k: number; east: number; north: number; height: number }[] = [];
  sc.epochs.forEach((ep, k) => {
    const o = ep.observations.find((x) => x.point === code);
    if (o) out.push({ k, east: o.east, north: o.north, height: o.height });
  });
  return out;
}

describe("createRandom", () => {
  it("createRandom(seed).normal() has mean ≈ 0 and standard deviation ≈ 1 over 100 000 draws", () => {
    const r = createRandom(7);
    const xs = Array.from({ length: 100_000 }, () => r.normal());
    // Standard error of the mean 1/√n ≈ 0.003; of the sd ≈ 1/√(2n) ≈ 0.0022: 5 of each.
    expect(Math.abs(xs.reduce((s, x) => s + x, 0) / xs.length)).toBeLessThan(0.016);
    expect(Math.abs(sd(xs) - 1)).toBeLessThan(0.011);
  });
  it("createRandom(seed).uniform() stays in [0, 1) and repeats for the same seed", () => {
    const a = createRandom(42);
    const b = createRandom(42);
    for (let k = 0; k < 10_000; k++) {
      const x = a.uniform();
      expect(x).toBeGreaterThanOrEqual(0);
      expect(x).toBeLessThan(1);
      expect(b.uniform()).toBe(x);
    }
  });
  it("createRandom rejects a non-integer seed", () => {
    expect(() => createRandom(1.5)).toThrow(RangeError);
  });
});

describe("generateScenario", () => {
  it("generateScenario gives identical output for the same seed and different noise for another", () => {
    const again = generateScenario();
    expect(again).toEqual(sc);
    const other = generateScenario({ seed: 1 });
    expect(other.epochs[5].observations[0].east).not.toBe(sc.epochs[5].observations[0].east);
  });

  it("generateScenario builds about 150 targets: ground, two gables, the wall crest and six far references", () => {
    expect(sc.points.length).toBeGreaterThanOrEqual(140);
    expect(sc.points.length).toBeLessThanOrEqual(160);
    const count = (g: ScenarioPoint["group"]) => sc.points.filter((p) => p.group === g).length;
    expect(count("house-12")).toBe(12);
    expect(count("house-26")).toBe(12);
    expect(count("wall")).toBe(17);
    expect(count("reference")).toBe(6);
    expect(count("ground")).toBeGreaterThan(90);
    expect(sc.points.filter((p) => p.isReference).every((p) => p.group === "reference")).toBe(true);
    expect(new Set(sc.points.map((p) => p.code)).size).toBe(sc.points.length);
    for (const p of sc.points) {
      expect(p.east).toBeGreaterThanOrEqual(4000);
      expect(p.east).toBeLessThanOrEqual(4400);
      expect(p.north).toBeGreaterThanOrEqual(7000);
      expect(p.north).toBeLessThanOrEqual(7300);
      expect(p.height).toBeGreaterThanOrEqual(40);
      expect(p.height).toBeLessThanOrEqual(60);
    }
    // References are far from the pit (more than 100 m from its centreline).
    for (const p of sc.points.filter((q) => q.isReference)) expect(Math.hypot(p.east - Math.min(4270, Math.max(4150, p.east)), p.north - 7120)).toBeGreaterThan(100);
  });

  it("generateScenario gives 730 epochs, six hours apart, from the default start", () => {
    expect(sc.epochs).toHaveLength(730);
    expect(sc.epochs[0].time).toBe(new Date(DEFAULT_START).toISOString());
    for (let k = 1; k < sc.epochs.length; k++) expect(Date.parse(sc.epochs[k].time) - Date.parse(sc.epochs[k - 1].time)).toBe(CYCLE_S * 1000);
    expect(endDays).toBeCloseTo(182.25, 9);
  });

  it("generateScenario honours epochs and start", () => {
    const small = generateScenario({ epochs: 20, start: "2025-01-01T06:00:00+01:00" });
    expect(small.epochs).toHaveLength(20);
    expect(small.epochs[0].time).toBe("2025-01-01T05:00:00.000Z");
    expect(() => generateScenario({ epochs: 0 })).toThrow(RangeError);
    expect(() => generateScenario({ start: "yesterday" })).toThrow(RangeError);
  });

  it("hand-made elements: gable triangles in surface mode on vertical faces, wall crest baselines horizontal", () => {
    const tri = sc.elements.filter((e) => e.kind === "triangle");
    const base = sc.elements.filter((e) => e.kind === "baseline");
    expect(tri.length).toBe(12);
    expect(base.length).toBe(22);
    expect(base.filter((e) => e.structure === "wall").length).toBe(16);
    for (const e of tri) {
      expect(e.mode).toBe("surface");
      const [a, b, c] = e.pointCodes.map((code) => byCode.get(code)!);
      // All three on one plane E = const: a vertical face.
      expect(new Set([a.east, b.east, c.east]).size).toBe(1);
      // Well shaped: smallest interior angle at least 20° (domain.md §2).
      const pts = [a, b, c].map((p) => [p.north, p.height]);
      const ang = (i: number) => {
        const [p, q, r] = [pts[i], pts[(i + 1) % 3], pts[(i + 2) % 3]];
        const u = [q[0] - p[0], q[1] - p[1]];
        const v = [r[0] - p[0], r[1] - p[1]];
        return (Math.acos((u[0] * v[0] + u[1] * v[1]) / (Math.hypot(u[0], u[1]) * Math.hypot(v[0], v[1]))) * 180) / Math.PI;
      };
      expect(Math.min(ang(0), ang(1), ang(2))).toBeGreaterThanOrEqual(20);
    }
    for (const e of base) {
      expect(e.mode).toBe("horizontal");
      expect(e.pointCodes.every((c) => byCode.get(c)?.group === e.structure)).toBe(true);
    }
    expect(new Set(sc.elements.map((e) => e.name)).size).toBe(sc.elements.length);
  });
});

describe("scenario movements", () => {
  it("troughAt: the trough deepens and widens as the dig deepens (i = K·z0 grows)", () => {
    const days = [5, 30, 70, 110, 160];
    const i = days.map((d) => troughAt(4170, d).iM);
    const s = days.map((d) => troughAt(4170, d).sMaxM);
    for (let k = 1; k < days.length; k++) {
      expect(i[k]).toBeGreaterThan(i[k - 1]);
      expect(s[k]).toBeGreaterThan(s[k - 1]);
    }
  });

  it("observed settlement behind the pit grows with the dig and reaches further out", () => {
    const near = sc.points.filter((p) => p.group === "ground" && Math.abs(p.north - 7120) < 18 && p.east > 4160 && p.east < 4260);
    const far = sc.points.filter((p) => p.group === "ground" && Math.abs(p.north - 7120) > 26 && Math.abs(p.north - 7120) < 34 && p.east > 4160 && p.east < 4260);
    expect(near.length).toBeGreaterThan(4);
    expect(far.length).toBeGreaterThan(4);
    /** Mean observed settlement (m, positive down) of the points over one week of epochs from epoch k. */
    const settle = (pts: ScenarioPoint[], k: number) => {
      const v: number[] = [];
      for (let j = k; j < k + 28; j++) for (const o of sc.epochs[j].observations) if (pts.some((p) => p.code === o.point)) v.push(byCode.get(o.point)!.height - o.height);
      return v.reduce((a, b) => a + b, 0) / v.length;
    };
    const early = settle(near, 120); // day 30
    const mid = settle(near, 360); // day 90
    const late = settle(near, 680); // day 170
    expect(mid).toBeGreaterThan(early + 0.002);
    expect(late).toBeGreaterThan(mid + 0.002);
    // The far band barely moves at day 30 and settles several millimetres by the end: the trough widened.
    expect(settle(far, 120)).toBeLessThan(0.001);
    expect(settle(far, 680)).toBeGreaterThan(0.003);
    // Behind the wall the ground moves toward the pit (north side: toward the south).
    const k = 700;
    for (const p of near.filter((q) => q.north > 7120)) {
      const u = modelDisplacement(p, (k * CYCLE_S) / 86400, endDays, 0);
      expect(u[1]).toBeLessThan(0);
      expect(u[2]).toBeLessThan(0);
    }
  });

  it("the baseline epoch is the mean of four sets: σ halved and stated on each observation", () => {
    const first = sc.epochs[0].observations;
    expect(first.every((o) => o.sigmaEast === SITE.sigmaHM / 2 && o.sigmaNorth === SITE.sigmaHM / 2 && o.sigmaHeight === SITE.sigmaVM / 2)).toBe(true);
    expect(sc.epochs[1].observations.every((o) => o.sigmaEast === undefined)).toBe(true);
  });

  it("survey noise matches the site's σ: 1 mm horizontal, 1.5 mm vertical, within 3 %", () => {
    const startS = Date.parse(sc.epochs[0].time) / 1000;
    const re: number[] = [];
    const rn: number[] = [];
    const rh: number[] = [];
    const skip = new Set(sc.points.filter((p) => p.note?.startsWith("Replaces")).flatMap((p) => [p.code, p.note!.split(" ")[1]]));
    sc.epochs.forEach((ep, k) => {
      if (k === 0) return;
      const tDays = (k * CYCLE_S) / 86400;
      const dT = temperatureChangeK(startS + k * CYCLE_S, startS);
      for (const o of ep.observations) {
        if (skip.has(o.point)) continue;
        const p = byCode.get(o.point)!;
        const u = modelDisplacement(p, tDays, endDays, dT);
        re.push(o.east - p.east - u[0]);
        rn.push(o.north - p.north - u[1]);
        rh.push(o.height - p.height - u[2]);
      }
    });
    // ~10⁵ residuals per axis: the sd of the sd is about 0.2 %, rounding to 0.1 mm adds 0.03 mm.
    expect(sd(re) / SITE.sigmaHM).toBeGreaterThan(0.97);
    expect(sd(re) / SITE.sigmaHM).toBeLessThan(1.03);
    expect(sd(rn) / SITE.sigmaHM).toBeGreaterThan(0.97);
    expect(sd(rn) / SITE.sigmaHM).toBeLessThan(1.03);
    expect(sd(rh) / SITE.sigmaVM).toBeGreaterThan(0.97);
    expect(sd(rh) / SITE.sigmaVM).toBeLessThan(1.03);
  });

  it("reference targets stay put: their mean over the six months is within 0.1 mm of the nominal position", () => {
    for (const p of sc.points.filter((q) => q.isReference)) {
      const obs = observed(p.code);
      expect(obs.length).toBe(sc.epochs.length);
      const m = obs.reduce((s, o) => s + o.height, 0) / obs.length;
      expect(Math.abs(m - p.height)).toBeLessThan(0.0002);
    }
  });

  it("a few readings are missed, and one target is knocked (a jump) and replaced under a new code", () => {
    const total = sc.epochs.reduce((s, e) => s + e.observations.length, 0);
    const possible = sc.epochs.length * sc.points.length;
    expect(total).toBeLessThan(possible);
    expect(total).toBeGreaterThan(possible * 0.98);
    const replacement = sc.points.find((p) => p.note?.startsWith("Replaces"))!;
    const oldCode = replacement.note!.split(" ")[1];
    expect(replacement.code).toBe(`${oldCode}B`);
    const oldObs = observed(oldCode);
    const newObs = observed(replacement.code);
    expect(oldObs.length).toBeGreaterThan(100);
    expect(newObs.length).toBeGreaterThan(100);
    // The old one stops before the new one starts.
    expect(oldObs[oldObs.length - 1].k).toBeLessThan(newObs[0].k);
    // The knock: a jump of about 25 mm in plan between two consecutive readings of the old target.
    const jumps = oldObs.slice(1).map((o, j) => Math.hypot(o.east - oldObs[j].east, o.north - oldObs[j].north));
    expect(Math.max(...jumps)).toBeGreaterThan(0.015);
    expect(sc.events.map((e) => e.kind)).toEqual(expect.arrayContaining(["knocked", "replaced", "obstructed", "acceleration"]));
  });

  it("the north-west zone accelerates over the last three weeks with 1/v linear in time toward t_f (Fukuzono 1985)", () => {
    const p = { east: ACCELERATION.centreEast, north: ACCELERATION.centreNorth, group: "ground" as const };
    const speed = (t: number) => {
      const dt = 0.25;
      const a = modelDisplacement(p, t - dt, endDays, 0);
      const b = modelDisplacement(p, t, endDays, 0);
      return Math.hypot(b[0] - a[0], b[1] - a[1], b[2] - a[2]) / dt;
    };
    const t0 = endDays - ACCELERATION.startsBeforeEndDays + 1;
    const ts = Array.from({ length: 20 }, (_, j) => t0 + j);
    const inv = ts.map((t) => 1 / speed(t));
    // Inverse velocity decreases steadily; a straight line through it crosses zero near end + 5 days.
    for (let j = 1; j < inv.length; j++) expect(inv[j]).toBeLessThan(inv[j - 1]);
    const n = ts.length;
    const mt = ts.reduce((s, t) => s + t, 0) / n;
    const mv = inv.reduce((s, v) => s + v, 0) / n;
    const slope = ts.reduce((s, t, j) => s + (t - mt) * (inv[j] - mv), 0) / ts.reduce((s, t) => s + (t - mt) ** 2, 0);
    const tf = mt - mv / slope;
    // The trough adds a nearly constant small velocity; the crossing falls within a day of the design t_f.
    expect(Math.abs(tf - (endDays + ACCELERATION.failureAfterEndDays))).toBeLessThan(1);
  });

  it("the wall crest moves a few millimetres with the seasons across a movement joint", () => {
    const a = observed("W05");
    const b = observed("W06");
    const len = new Map(a.map((o) => [o.k, o.east]));
    const gap = b.filter((o) => len.has(o.k)).map((o) => o.east - len.get(o.k)!);
    const weekly = (k0: number) => {
      const part = gap.slice(k0, k0 + 28);
      return part.reduce((s, x) => s + x, 0) / part.length;
    };
    const range = Math.max(...[0, 100, 200, 300, 400, 500, 600, 700].map(weekly)) - Math.min(...[0, 100, 200, 300, 400, 500, 600, 700].map(weekly));
    expect(range).toBeGreaterThan(0.002);
    expect(range).toBeLessThan(0.01);
  });
});
