import { describe, expect, it } from "vitest";
import { DateTime } from "luxon";
import { localIsoTimes } from "../../../lib/series/local-time.ts";

describe("localIsoTimes", () => {
  it.each(["Europe/Zurich", "America/Santiago", "Australia/Lord_Howe", "Asia/Kathmandu", "Africa/Casablanca", "UTC"])(
    "equals luxon's toISO() for every hour of 2025 in %s (DST changes included)",
    (zone) => {
      const t0 = Date.UTC(2025, 0, 1);
      const tMs = Float64Array.from({ length: 8760 }, (_, i) => t0 + i * 3_600_000);
      const got = localIsoTimes(tMs, zone);
      for (let i = 0; i < tMs.length; i++) {
        const want = DateTime.fromMillis(tMs[i], { zone }).toISO();
        if (got[i] !== want) expect(`${i}: ${got[i]}`).toBe(`${i}: ${want}`);
      }
    },
  );

  it("equals luxon on irregular, downsampled-looking times (gaps of days, then minutes)", () => {
    const tMs: number[] = [];
    let t = Date.UTC(2025, 2, 1);
    for (let i = 0; i < 500; i++) {
      t += i % 7 === 0 ? 5 * 86_400_000 : 900_000;
      tMs.push(t);
    }
    const got = localIsoTimes(tMs, "Europe/London");
    tMs.forEach((ms, i) => expect(got[i]).toBe(DateTime.fromMillis(ms, { zone: "Europe/London" }).toISO()));
  });

  it("returns an empty list for no times", () => {
    expect(localIsoTimes([], "Europe/Zurich")).toEqual([]);
  });
});
