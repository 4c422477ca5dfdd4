/** Small helpers for the dashboard's raw read queries (PostgreSQL array literals as one text parameter). */

/** `{1,2,3}` for an `$n::int[]` parameter. */
export function intList(values: readonly number[]): string {
  for (const v of values) if (!Number.isSafeInteger(v)) throw new RangeError(`intList: not an integer: ${v}`);
  return `{${values.join(",")}}`;
}
