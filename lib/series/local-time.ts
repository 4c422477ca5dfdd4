import { IANAZone } from "luxon";

/**
 * Local ISO times (the site's zone, as luxon's `toISO()` writes them: `2026-03-01T01:00:00.000+01:00`)
 * for increasing UTC instants. Zone offsets come from luxon's IANAZone, but only at the ends of
 * bisected spans: where both ends of a span of at most 14 days have the same offset, every instant
 * inside gets it. Offset changes lie months apart in every zone in use (the shortest, suspensions of
 * summer time for a month, are still longer than 14 days), so this is exact and needs about a hundred
 * offset look-ups for a year instead of one per point (each costs ~10 µs).
 */
/**
 * Zones by name, UTC for an unknown name. luxon's isValidZone builds an Intl.DateTimeFormat on every
 * call (about 0.7 ms, as much as the offsets of a whole year); a process sees only a few zone names.
 */
const ZONES = new Map<string, IANAZone>();
function zoneOf(timeZone: string): IANAZone {
  let zone = ZONES.get(timeZone);
  if (!zone) {
    zone = IANAZone.isValidZone(timeZone) ? IANAZone.create(timeZone) : IANAZone.create("UTC");
    ZONES.set(timeZone, zone);
  }
  return zone;
}

/** "+01:00" for 60 minutes, "-03:30" for −210. */
function offsetSuffix(offsetMin: number): string {
  const a = Math.abs(offsetMin);
  return `${offsetMin < 0 ? "-" : "+"}${String(Math.floor(a / 60)).padStart(2, "0")}:${String(a % 60).padStart(2, "0")}`;
}

export function localIsoTimes(tMs: ArrayLike<number>, timeZone: string): string[] {
  const n = tMs.length;
  const out: string[] = new Array(n);
  const zone = zoneOf(timeZone);
  const isUtc = zone.name === "UTC" || zone.name === "Etc/UTC";
  const off = new Float64Array(n).fill(NaN);
  const at = (i: number): number => (Number.isNaN(off[i]) ? (off[i] = zone.offset(tMs[i])) : off[i]);
  const SPAN_MS = 14 * 86_400_000;
  const stack: [number, number][] = n ? [[0, n - 1]] : [];
  while (stack.length) {
    const [lo, hi] = stack.pop() as [number, number];
    if (hi - lo <= 1) {
      at(lo);
      at(hi);
      continue;
    }
    if (at(lo) === at(hi) && tMs[hi] - tMs[lo] <= SPAN_MS) {
      off.fill(off[lo], lo + 1, hi);
      continue;
    }
    const mid = (lo + hi) >> 1;
    stack.push([lo, mid], [mid, hi]);
  }
  let lastOffset = NaN;
  let suffix = "";
  for (let i = 0; i < n; i++) {
    const o = off[i];
    const iso = new Date(tMs[i] + o * 60_000).toISOString();
    if (isUtc) {
      out[i] = iso;
      continue;
    }
    if (o !== lastOffset) {
      lastOffset = o;
      suffix = offsetSuffix(o);
    }
    out[i] = iso.slice(0, -1) + suffix;
  }
  return out;
}
