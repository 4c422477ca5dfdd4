import { describe, expect, it } from "vitest";
import { parseCopyBinary, readInt4 } from "../../../lib/formats/pg-copy-binary.ts";

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
