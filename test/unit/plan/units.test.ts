import { describe, expect, it } from "vitest";
import { formatLength, formatStrain } from "../../../lib/plan/units.ts";
import { niceCeil, niceFloor } from "../../../lib/plan/nice.ts";
import { isSignificant } from "../../../lib/plan/quantities.ts";

describe("formatStrain", () => {
  it("formatStrain shows µε as whole numbers and percent with four decimals, with a true minus sign", () => {
    expect(formatStrain(412.4e-6, "ue")).toBe("412 µε");
    expect(formatStrain(412.4e-6, "ue", { signed: true })).toBe("+412 µε");
    expect(formatStrain(-412.4e-6, "ue")).toBe("−412 µε");
    expect(formatStrain(3.25e-6, "ue")).toBe("3.3 µε");
    expect(formatStrain(0.000750, "pct")).toBe("0.0750 %");
    expect(formatStrain(0.0000412, "pct", { withUnit: false })).toBe("0.00412");
    expect(formatStrain(null, "ue")).toBe("–");
    expect(formatStrain(-1e-12, "ue")).toBe("0.0 µε");
  });

  it("formatLength shows mm below a metre", () => {
    expect(formatLength(0.0042)).toBe("4.2 mm");
    expect(formatLength(-0.0042)).toBe("−4.2 mm");
    expect(formatLength(12.3456)).toBe("12.346 m");
  });
});

describe("niceFloor / niceCeil", () => {
  it("niceFloor and niceCeil return 1, 2 or 5 times a power of ten", () => {
    expect(niceFloor(730)).toBe(500);
    expect(niceFloor(1000)).toBe(1000);
    expect(niceFloor(0.0031)).toBeCloseTo(0.002, 15);
    expect(niceCeil(730)).toBe(1000);
    expect(niceCeil(1.5e-4)).toBeCloseTo(2e-4, 15);
    expect(niceCeil(500)).toBe(500);
    expect(niceFloor(0)).toBe(0);
    expect(niceCeil(NaN)).toBe(0);
  });
});

describe("isSignificant", () => {
  it("isSignificant compares |value| with k·σ and is null without σ", () => {
    // domain.md §4: significant when |f| > k·σ_f, k = 1.96.
    expect(isSignificant(400e-6, 200e-6)).toBe(true);
    expect(isSignificant(-390e-6, 200e-6)).toBe(false);
    expect(isSignificant(1, null)).toBeNull();
  });
});

describe("formatSiteTime", () => {
  it("formatSiteTime shows the instant on the site's clock", async () => {
    const { formatSiteTime } = await import("../../../lib/plan/time.ts");
    // 2025-01-15T12:00Z is 13:00 in Zurich (CET, UTC+1) and 07:00 in New York (EST, UTC−5).
    const ms = Date.UTC(2025, 0, 15, 12, 0);
    expect(formatSiteTime(ms, "Europe/Zurich")).toBe("2025-01-15 13:00 +01:00");
    expect(formatSiteTime(ms, "America/New_York")).toBe("2025-01-15 07:00 -05:00");
  });
});

describe("niceCeilFine", () => {
  it("niceCeilFine rounds up to 1, 1.5, 2, 2.5, 3, 4, 5, 6 or 8 times a power of ten", async () => {
    const { niceCeilFine } = await import("../../../lib/plan/nice.ts");
    expect(niceCeilFine(1277e-6)).toBeCloseTo(1500e-6, 15);
    expect(niceCeilFine(2.1)).toBe(2.5);
    expect(niceCeilFine(8.5)).toBe(10);
    expect(niceCeilFine(7)).toBe(8);
    expect(niceCeilFine(0)).toBe(0);
  });
});
