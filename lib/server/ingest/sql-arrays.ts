/**
 * PostgreSQL array literals for bulk statements (`INSERT … SELECT FROM unnest($1::float8[], …)`).
 * One text parameter per column is far cheaper to send than a driver-side array of a million
 * values. Numbers use JavaScript's shortest round-trip form, which PostgreSQL's float8 input reads
 * back to the same double.
 */

/** `{1,2,3}`; null elements become NULL. */
export function intArray(values: readonly (number | null)[]): string {
  let s = "{";
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (i > 0) s += ",";
    if (v === null) s += "NULL";
    else {
      if (!Number.isSafeInteger(v)) throw new RangeError(`intArray: not an integer: ${v}`);
      s += v;
    }
  }
  return s + "}";
}

/** `{1.5,-2e-7,NULL}`; non-finite values are a programmer error (the database refuses them too). */
export function floatArray(values: readonly (number | null)[]): string {
  let s = "{";
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (i > 0) s += ",";
    if (v === null) s += "NULL";
    else {
      if (!Number.isFinite(v)) throw new RangeError(`floatArray: not a finite number: ${v}`);
      s += String(v);
    }
  }
  return s + "}";
}

/** `{"a","b \"c\""}`; every element quoted, backslash and double quote escaped; null becomes NULL. */
export function textArray(values: readonly (string | null)[]): string {
  let s = "{";
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (i > 0) s += ",";
    s += v === null ? "NULL" : `"${v.replace(/[\\"]/g, (c) => "\\" + c)}"`;
  }
  return s + "}";
}

/** PostgreSQL type oids of the binary array elements below (pg_type). */
const FLOAT8_OID = 701;
const INT4_OID = 23;

/**
 * The binary form of a one-dimensional array (PostgreSQL's array_send/array_recv layout: ndim, null
 * flag, element oid, length, lower bound 1, then per element its byte length, or −1 for NULL, and its
 * big-endian bytes). node-postgres sends a Buffer parameter in binary format, so `$1::float8[]` bound to
 * this reaches the server without any number being printed or parsed; about ten times cheaper on
 * both sides than the text literal for the ~70,000 numbers of a live epoch's results.
 */
function binaryArray(values: ArrayLike<number | null>, oid: number, width: 4 | 8, put: (dv: DataView, at: number, v: number) => void, nanIsNull = false): Buffer {
  const n = values.length;
  const isNull = nanIsNull ? (v: number | null): v is null => v === null || Number.isNaN(v) : (v: number | null): v is null => v === null;
  let nulls = 0;
  for (let i = 0; i < n; i++) if (isNull(values[i])) nulls++;
  const buf = Buffer.allocUnsafe(n === 0 ? 12 : 20 + 4 * n + width * (n - nulls));
  const dv = new DataView(buf.buffer, buf.byteOffset, buf.byteLength);
  dv.setInt32(0, n === 0 ? 0 : 1);
  dv.setInt32(4, nulls > 0 ? 1 : 0);
  dv.setInt32(8, oid);
  if (n === 0) return buf;
  dv.setInt32(12, n);
  dv.setInt32(16, 1);
  let at = 20;
  for (let i = 0; i < n; i++) {
    const v = values[i];
    if (isNull(v)) {
      dv.setInt32(at, -1);
      at += 4;
    } else {
      dv.setInt32(at, width);
      put(dv, at + 4, v);
      at += 4 + width;
    }
  }
  return buf;
}

/**
 * float8[] in binary form; null elements become NULL, other non-finite values are a programmer error
 * (as floatArray). `nanIsNull`: NaN is NULL too (columns kept in a Float64Array, see ResultColumns).
 */
export function floatArrayBinary(values: ArrayLike<number | null>, opts: { nanIsNull?: boolean } = {}): Buffer {
  return binaryArray(
    values,
    FLOAT8_OID,
    8,
    (dv, at, v) => {
      if (!Number.isFinite(v)) throw new RangeError(`floatArrayBinary: not a finite number: ${v}`);
      dv.setFloat64(at, v);
    },
    opts.nanIsNull === true,
  );
}

/** int4[] in binary form; null elements become NULL; values outside int4 are a programmer error. */
export function intArrayBinary(values: ArrayLike<number | null>): Buffer {
  return binaryArray(values, INT4_OID, 4, (dv, at, v) => {
    if (!Number.isInteger(v) || v < -2147483648 || v > 2147483647) throw new RangeError(`intArrayBinary: not an int4: ${v}`);
    dv.setInt32(at, v);
  });
}
