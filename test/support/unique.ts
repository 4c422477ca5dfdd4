let n = 0;
/** A slug no other test in this run uses (tests share one database and never clean up each other's rows). */
export function uniqueSlug(prefix = "t"): string {
  n += 1;
  return `${prefix}-${process.pid.toString(36)}-${Date.now().toString(36)}-${n}`;
}
