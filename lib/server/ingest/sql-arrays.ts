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
