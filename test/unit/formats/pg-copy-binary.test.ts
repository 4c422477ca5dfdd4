import { describe, expect, it } from "vitest";
import { parseCopyBinary, readInt4, writeCopyBinary } from "../../../lib/formats/pg-copy-binary.ts";

/** A stream laid out as the PostgreSQL documentation (COPY, "Binary Format") describes it. */
function stream(rows: (Uint8Array | null)[][], extension = new Uint8Array(0)): Uint8Array {
  const parts: number[] = [0x50, 0x47, 0x43, 0x4f, 0x50, 0x59, 0x0a, 0xff, 0x0d, 0x0a, 0x00];
  const u32 = (x: number) => parts.push((x >>> 24) & 255, (x >>> 16) & 255, (x >>> 8) & 255, x & 255);
  const i16 = (x: number) => parts.push((x >> 8) & 255, x & 255);
  u32(0); // flags
  u32(extension.byteLength);
  parts.push(...extension);
  for (const r of rows) {
    i16(r.length);
    for (const f of r) {
      if (f === null) u32(0xffffffff);
      else {
        u32(f.byteLength);
        parts.push(...f);
      }
    }
  }
  i16(-1);
  return Uint8Array.from(parts);
}

describe("parseCopyBinary", () => {
  it("returns each tuple's fields, NULL as null, skipping a header extension", () => {
    const int4 = Uint8Array.from([0, 0, 0x88, 0xe0]); // 35,040
    const bytes = Uint8Array.from([1, 2, 3]);
    const rows = parseCopyBinary(stream([[int4, null, bytes], [new Uint8Array(0)]], Uint8Array.from([9, 9])));
    expect(rows).toHaveLength(2);
    expect(readInt4(rows[0][0]!)).toBe(35_040);
    expect(rows[0][1]).toBeNull();
    expect(Array.from(rows[0][2]!)).toEqual([1, 2, 3]);
    expect(rows[1][0]!.byteLength).toBe(0);
  });

  it("reads a negative int4 in two's complement", () => {
    expect(readInt4(Uint8Array.from([0xff, 0xff, 0xff, 0xfe]))).toBe(-2);
  });

  it("refuses a bad signature, unknown critical flags and a stream cut short", () => {
    const good = stream([[Uint8Array.from([0, 0, 0, 1])]]);
    const badSig = good.slice();
    badSig[0] = 0x51;
    expect(() => parseCopyBinary(badSig)).toThrow(/signature/);
    const badFlags = good.slice();
    badFlags[11] = 0x80;
    expect(() => parseCopyBinary(badFlags)).toThrow(/flags/);
    expect(() => parseCopyBinary(good.subarray(0, good.byteLength - 4))).toThrow(/ends/);
  });
});

describe("writeCopyBinary", () => {
  it("lays out header, tuples and trailer as the documented stream, NaN as NULL, rows [from, to) only", () => {
    const out = writeCopyBinary(
      [
        { type: "int4", values: Int32Array.from([7, -2, 99]) },
        { type: "float8", values: [1.5, Number.NaN, 0] },
        { type: "text", values: ["ok", null, "x"] },
        { type: "timestamptz", values: ["2000-01-01T00:00:01.000Z", "1999-12-31T23:59:59.999Z", "2000-01-01T00:00:00.000Z"] },
      ],
      0,
      2,
    );
    const f64 = (x: number) => {
      const b = new Uint8Array(8);
      new DataView(b.buffer).setFloat64(0, x);
      return b;
    };
    const i64 = (x: bigint) => {
      const b = new Uint8Array(8);
      new DataView(b.buffer).setBigInt64(0, x);
      return b;
    };
    // Expected bytes built by the documented layout (the test helper above), independently of the writer.
    const want = stream([
      [Uint8Array.from([0, 0, 0, 7]), f64(1.5), new TextEncoder().encode("ok"), i64(1_000_000n)],
      [Uint8Array.from([0xff, 0xff, 0xff, 0xfe]), null, null, i64(-1_000n)],
    ]);
    expect([...out]).toEqual([...want]);
    // And the reader takes it back.
    const rows = parseCopyBinary(out);
    expect(rows).toHaveLength(2);
    expect(readInt4(rows[0][0] as Uint8Array)).toBe(7);
  });

  it("refuses values the column types cannot hold", () => {
    expect(() => writeCopyBinary([{ type: "int4", values: [2 ** 31] }], 0, 1)).toThrow(RangeError);
    expect(() => writeCopyBinary([{ type: "float8", values: [Number.POSITIVE_INFINITY] }], 0, 1)).toThrow(RangeError);
    expect(() => writeCopyBinary([{ type: "timestamptz", values: ["2024-01-01T00:00:00.000001Z"] }], 0, 1)).toThrow(RangeError);
    expect(() => writeCopyBinary([{ type: "timestamptz", values: ["yesterday"] }], 0, 1)).toThrow(RangeError);
  });
});
