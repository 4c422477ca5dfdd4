import { describe, expect, it } from "vitest";
import { parseEpochJson, parseEpochJsonText } from "../../../lib/formats/epoch-json.ts";

const obs = (point: string, east = 1, north = 2, height = 3) => ({ point, east, north, height });

describe("parseEpochJson", () => {
  it("parseEpochJson reads one epoch, normalises the time to UTC and keeps σ null when absent", () => {
    const r = parseEpochJson({ time: "2024-03-01T09:15:00+01:00", observations: [obs("P1"), { ...obs("P2"), sigma_east: 0.002, sigma_north: 0.003, sigma_height: 0.004 }] });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.epochs).toHaveLength(1);
    expect(r.epochs[0].time).toBe("2024-03-01T08:15:00.000Z");
    expect(r.epochs[0].observations[0]).toEqual({ point: "P1", east: 1, north: 2, height: 3, sigmaEast: null, sigmaNorth: null, sigmaHeight: null, line: null });
    expect(r.epochs[0].observations[1].sigmaNorth).toBe(0.003);
    expect(r.epochs[0].fieldOf(1, "east")).toBe("observations[1].east");
  });

  it("parseEpochJson reads a backfill { epochs: [...] } and names fields epochs[i].observations[j].key", () => {
    const r = parseEpochJson({ epochs: [{ time: "2024-03-01T00:00:00Z", observations: [obs("A")] }, { time: "2024-03-02T00:00:00Z", observations: [obs("A", 1.5)] }] });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.epochs.map((e) => e.time)).toEqual(["2024-03-01T00:00:00.000Z", "2024-03-02T00:00:00.000Z"]);
    expect(r.epochs[1].fieldOf(0, "north")).toBe("epochs[1].observations[0].north");
  });

  it("parseEpochJson takes the default time when the body has none, and refuses a missing time without one", () => {
    const ok = parseEpochJson({ observations: [obs("A")] }, { defaultTime: "2024-01-01T00:00:00Z" });
    expect(ok.ok && ok.epochs[0].time).toBe("2024-01-01T00:00:00.000Z");
    const bad = parseEpochJson({ observations: [obs("A")] });
    expect(bad.ok).toBe(false);
    if (!bad.ok) expect(bad.errors[0]).toMatchObject({ line: null, field: "time" });
  });

  it("parseEpochJson names the path of a non-number, a string number, a missing field and σ ≤ 0", () => {
    const r = parseEpochJson({
      time: "2024-03-01T00:00:00Z",
      observations: [obs("A"), { point: "B", east: "12.5", north: 1, height: 1 }, { point: "C", east: 1, height: 1 }, { ...obs("D"), sigma_height: 0 }, { ...obs("E"), east: null }],
    });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors.map((e) => e.field)).toEqual(["observations[1].east", "observations[2].north", "observations[3].sigma_height", "observations[4].east"]);
    expect(r.errors.every((e) => e.line === null)).toBe(true);
  });

  it("parseEpochJson refuses unknown keys, a point twice, a time without offset and two epochs at one time", () => {
    const r = parseEpochJson({ epochs: [
      { time: "2024-03-01T00:00:00", observations: [obs("A")] },
      { time: "2024-03-02T00:00:00Z", observations: [obs("A"), { ...obs("B"), sigma_est: 0.1 }, obs("A")] },
      { time: "2024-03-02T01:00:00+01:00", observations: [obs("A")] },
    ] });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors.map((e) => e.field)).toEqual(["epochs[0].time", "epochs[1].observations[1].sigma_est", "epochs[1].observations[2].point", "epochs[2].time"]);
  });

  it("parseEpochJson refuses an empty observations list and a body that is not an object", () => {
    const a = parseEpochJson({ time: "2024-03-01T00:00:00Z", observations: [] });
    expect(!a.ok && a.errors[0].field).toBe("observations");
    const b = parseEpochJson([obs("A")]);
    expect(!b.ok && b.errors[0].field).toBe(null);
  });

  it("parseEpochJsonText reports a syntax error with its line, and 1e999 (infinite) as not finite", () => {
    const a = parseEpochJsonText('{\n "time": "2024-03-01T00:00:00Z",\n "observations": [ { "point": "A", "east": NaN } ]\n}');
    expect(a.ok).toBe(false);
    if (!a.ok) {
      expect(a.errors[0].message).toMatch(/not valid JSON/);
      expect(a.errors[0].line).toBe(3);
    }
    const b = parseEpochJsonText('{"time":"2024-03-01T00:00:00Z","observations":[{"point":"A","east":1e999,"north":1,"height":1}]}');
    expect(!b.ok && b.errors[0].field).toBe("observations[0].east");
  });
});

describe("locateJsonError", () => {
  it("locateJsonError returns null for valid JSON and the offset where the grammar breaks otherwise", async () => {
    const { locateJsonError } = await import("../../../lib/formats/epoch-json.ts");
    for (const ok of ['{"a": [1, -2.5e3, true, false, null, "x\\n\\u00e9"]}', "  []  ", '"s"', "0"]) {
      expect(locateJsonError(ok)).toBe(null);
      expect(() => JSON.parse(ok)).not.toThrow();
    }
    expect(locateJsonError('{"a": [1, 2,]}')).toBe(12);
    expect(locateJsonError('{"a": 01}')).toBe(7);
    expect(locateJsonError('{"a" 1}')).toBe(5);
    expect(locateJsonError("[1] x")).toBe(4);
    expect(locateJsonError('{"a": "unterminated}')).toBe(6);
  });
});
