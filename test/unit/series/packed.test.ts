import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { decodeFloat8BE, decodePgTimestampsMs, orderByTime, PG_EPOCH_MS } from "../../../lib/series/packed.ts";

const bytes = (...hex: string[]): Uint8Array => Uint8Array.from(Buffer.from(hex.join(""), "hex"));

describe("decodeFloat8BE", () => {
  it("reads big-endian IEEE 754 doubles (bit patterns from IEEE 754-2019, binary64)", () => {
    // 1.0 = 0x3FF0000000000000, -2.0 = 0xC000000000000000, smallest subnormal 2^-1074 = 0x0000000000000001, NaN = 0x7FF8…
    const out = decodeFloat8BE(bytes("3ff0000000000000", "c000000000000000", "0000000000000001", "7ff8000000000000"), 4);
    expect(out[0]).toBe(1);
    expect(out[1]).toBe(-2);
    expect(out[2]).toBe(2 ** -1074);
    expect(Number.isNaN(out[3])).toBe(true);
  });

  it("reads a byte string that starts inside a larger buffer", () => {
    const big = bytes("ff", "3ff8000000000000"); // 1.5 after one stray byte
    expect(Array.from(decodeFloat8BE(big.subarray(1), 1))).toEqual([1.5]);
  });

  it("gives zeros for no bytes and refuses a length that is not 8·n", () => {
    expect(Array.from(decodeFloat8BE(null, 2))).toEqual([0, 0]);
    expect(() => decodeFloat8BE(bytes("3ff00000"), 1)).toThrow(RangeError);
  });
});

describe("decodePgTimestampsMs", () => {
  it("reads µs since 2000-01-01 UTC (PostgreSQL's timestamp origin) as epoch ms", () => {
    expect(PG_EPOCH_MS).toBe(Date.parse("2000-01-01T00:00:00Z"));
    // 0 µs → the origin; -1,000 µs → 1 ms before; 2^32 µs (carry into the high word) → 4,294,967.296 ms later.
    const out = decodePgTimestampsMs(bytes("0000000000000000", "fffffffffffffc18", "0000000100000000"), 3);
    expect(out[0]).toBe(PG_EPOCH_MS);
    expect(out[1]).toBe(PG_EPOCH_MS - 1);
    expect(out[2]).toBe(PG_EPOCH_MS + 4_294_967.296);
  });

  it("round-trips every millisecond instant it is given exactly (property, 1900–2200)", () => {
    const lo = Date.parse("1900-01-01T00:00:00Z");
    const hi = Date.parse("2200-01-01T00:00:00Z");
    fc.assert(
      fc.property(fc.array(fc.integer({ min: lo, max: hi }), { minLength: 1, maxLength: 50 }), (ms) => {
        const buf = new Uint8Array(8 * ms.length);
        const dv = new DataView(buf.buffer);
        ms.forEach((t, i) => dv.setBigInt64(8 * i, BigInt(t - PG_EPOCH_MS) * 1000n, false));
        expect(Array.from(decodePgTimestampsMs(buf, ms.length))).toEqual(ms);
      }),
    );
  });
});

describe("orderByTime", () => {
  it("returns the same arrays when the times already increase", () => {
    const s = { tMs: new Float64Array([1, 2, 3]), value: new Float64Array([4, 5, 6]), sigma: new Float64Array([7, 8, 9]) };
    expect(orderByTime(s)).toBe(s);
  });

  it("sorts by time with each value and σ kept beside its time, leaving the input unchanged (property)", () => {
    fc.assert(
      fc.property(fc.uniqueArray(fc.integer({ min: 0, max: 1e9 }), { minLength: 2, maxLength: 200 }), (times) => {
        const s = { tMs: Float64Array.from(times), value: Float64Array.from(times, (t) => t * 2), sigma: Float64Array.from(times, (t) => -t) };
        const before = Array.from(s.tMs);
        const o = orderByTime(s);
        expect(Array.from(o.tMs)).toEqual([...times].sort((a, b) => a - b));
        o.tMs.forEach((t, i) => {
          expect(o.value[i]).toBe(t * 2);
          expect(o.sigma[i]).toBe(-t);
        });
        expect(Array.from(s.tMs)).toEqual(before);
      }),
    );
  });
});
