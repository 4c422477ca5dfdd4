/** Times shown in the site's time zone (stored UTC; domain.md §1). */
import { DateTime } from "luxon";

/**
 * e.g. "2025-03-04 08:15 +01:00": the offset tells the reader which clock. Offsets, not zone
 * abbreviations, because abbreviations depend on the runtime's locale data and would differ between
 * the server's render and the browser's.
 */
export function formatSiteTime(ms: number, zone: string, withSeconds = false): string {
  const dt = DateTime.fromMillis(ms, { zone });
  if (!dt.isValid) return new Date(ms).toISOString();
  return dt.toFormat(withSeconds ? "yyyy-LL-dd HH:mm:ss ZZ" : "yyyy-LL-dd HH:mm ZZ");
}

/** The zone as a reader sees it: "Europe/Zurich (UTC+01:00)" at the given instant. */
export function describeZone(zone: string, atMs = Date.now()): string {
  const dt = DateTime.fromMillis(atMs, { zone });
  if (!dt.isValid) return zone;
  return `${zone} (UTC${dt.toFormat("ZZ")})`;
}
