/**
 * Decoding of the packed columns a series read returns: 8-byte big-endian values concatenated into
 * one byte string, as PostgreSQL's binary send functions write them (the "binary format" of the
 * frontend/backend protocol, PostgreSQL documentation, ch. "Frontend/Backend Protocol", and
 * src/backend/utils/adt: float8send writes the IEEE 754 bits, timestamptz_send the int64 count of
 * microseconds since 2000-01-01 00:00:00 UTC). Pure; the inputs are never changed.
 */
import type { SeriesArrays } from "./increments.ts";

/** 2000-01-01T00:00:00Z in UTC epoch milliseconds (PostgreSQL's timestamp origin). */
export const PG_EPOCH_MS = 946_684_800_000;

function checkLength(bytes: Uint8Array, n: number): void {
  if (bytes.byteLength !== 8 * n) throw new RangeError(`packed series: ${bytes.byteLength} bytes for ${n} values of 8 bytes`);
}

/** float8send output (big-endian IEEE 754 doubles) as a Float64Array of `n` values; empty bytes → zeros. */
export function decodeFloat8BE(bytes: Uint8Array | null, n: number): Float64Array {
  const out = new Float64Array(n);
  if (!bytes || n === 0) return out;
  checkLength(bytes, n);
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let i = 0; i < n; i++) out[i] = dv.getFloat64(8 * i, false);
  return out;
}

/**
 * timestamptz_send output (big-endian int64 µs since 2000-01-01 UTC) as UTC epoch milliseconds.
 * Exact for millisecond timestamps (timestamptz(3) columns) within ±285,000 years of 2000: the µs
 * count is then an integer below 2^53, split into its two 32-bit halves without rounding, and a
 * multiple of 1,000, so the division is exact too. Finer timestamps keep their fraction of a ms.
 */
export function decodePgTimestampsMs(bytes: Uint8Array | null, n: number): Float64Array {
  const out = new Float64Array(n);
  if (!bytes || n === 0) return out;
  checkLength(bytes, n);
  const dv = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  for (let i = 0; i < n; i++) out[i] = (dv.getInt32(8 * i, false) * 4_294_967_296 + dv.getUint32(8 * i + 4, false)) / 1000 + PG_EPOCH_MS;
  return out;
}

/**
 * The series in increasing time: the input itself when it already is (one pass), else a sorted copy
 * with values and σ kept beside their times. Equal times keep their input order (stable sort).
 */
export function orderByTime(s: SeriesArrays): SeriesArrays {
  const n = s.tMs.length;
  let sorted = true;
  for (let i = 1; i < n && sorted; i++) if (s.tMs[i] < s.tMs[i - 1]) sorted = false;
  if (sorted) return s;
  const idx = Array.from({ length: n }, (_, i) => i).sort((a, b) => s.tMs[a] - s.tMs[b] || a - b);
  return { tMs: Float64Array.from(idx, (i) => s.tMs[i]), value: Float64Array.from(idx, (i) => s.value[i]), sigma: Float64Array.from(idx, (i) => s.sigma[i]) };
}
