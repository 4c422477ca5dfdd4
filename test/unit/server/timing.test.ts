/**
 * PhaseTimer and the Server-Timing header (W3C Server Timing, https://www.w3.org/TR/server-timing/:
 * `metric;dur=milliseconds`, entries separated by commas, names are tokens).
 */
import { describe, expect, it, vi } from "vitest";
import { PhaseTimer, parseServerTiming } from "../../../lib/server/timing.ts";

/** A timer made at clock `start`, then one lap per [clock, name], on a mocked performance.now. */
function timerWithLaps(start: number, laps: [number, string][]): PhaseTimer {
  const now = vi.spyOn(performance, "now");
  try {
    now.mockReturnValue(start);
    const t = new PhaseTimer();
    for (const [at, name] of laps) {
      now.mockReturnValue(at);
      t.lap(name);
    }
    return t;
  } finally {
    now.mockRestore();
  }
}

describe("PhaseTimer", () => {
  it("laps the time since the previous lap, adds laps of one name, keeps first-lap order", () => {
    const t = timerWithLaps(100, [[103.25, "parse"], [110, "store"], [111.5, "parse"]]);
    expect(t.phases()).toEqual([
      { name: "parse", ms: 4.75 },
      { name: "store", ms: 6.75 },
    ]);
    expect(t.header()).toBe("parse;dur=4.8, store;dur=6.8");
  });

  it("writes names as tokens and reads its own header back", () => {
    const t = timerWithLaps(0, [[2, "results insert/copy"]]);
    expect(t.header()).toBe("results_insert_copy;dur=2.0");
    expect(parseServerTiming(t.header())).toEqual(new Map([["results_insert_copy", 2]]));
    expect(parseServerTiming('db;desc="primary";dur=5.5, cache, app;dur=1')).toEqual(new Map([["db", 5.5], ["app", 1]]));
    expect(parseServerTiming(null).size).toBe(0);
  });
});
