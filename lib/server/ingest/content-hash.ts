/**
 * The content hash of an epoch: what tells "the same epoch again" (200, its id returned) from "other
 * coordinates at that time" (409, or a revision). Stored in Epoch.contentHash.
 */
import { createHash } from "node:crypto";

/** An observation as stored: σ defaults of the site applied. */
export interface ResolvedObservation {
  point: string;
  east: number;
  north: number;
  height: number;
  sigmaEast: number;
  sigmaNorth: number;
  sigmaHeight: number;
}

/** String(v), remembering the last value and its text (String(v) is the same text for the same double). */
function lastText(): (v: number) => string {
  let last = Number.NaN;
  let text = "NaN";
  return (v) => (Object.is(v, last) ? text : ((last = v), (text = String(v))));
}

/**
 * SHA-256 (hex) of an epoch's content: observations sorted by point code (code-unit order), one line
 * each `point TAB east TAB north TAB height TAB σE TAB σN TAB σH`, numbers in JavaScript's shortest
 * round-trip form (exact: equal doubles give equal text). σ as stored (defaults applied), so the
 * same epoch from CSV, JSON or GeoJSON hashes the same. The time is not part of it.
 */
export function epochContentHash(obs: readonly ResolvedObservation[]): string {
  const sorted = [...obs].sort((a, b) => (a.point < b.point ? -1 : a.point > b.point ? 1 : 0));
  // One text, hashed once (the same bytes as one update per line, without a native call per line).
  // σ repeats from row to row (site defaults): each column's last text is reused for the same value.
  const se = lastText(), sn = lastText(), sh = lastText();
  let text = "";
  for (const o of sorted) text += `${o.point}\t${o.east}\t${o.north}\t${o.height}\t${se(o.sigmaEast)}\t${sn(o.sigmaNorth)}\t${sh(o.sigmaHeight)}\n`;
  return createHash("sha256").update(text, "utf8").digest("hex");
}
