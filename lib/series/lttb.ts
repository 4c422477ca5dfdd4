/**
 * Downsampling of long series for charts without losing peaks.
 *
 * Largest-triangle-three-buckets (Steinarsson, S. 2013, "Downsampling Time Series for Visual
 * Representation", MSc thesis, University of Iceland, ch. 4.2): the first and last points are kept;
 * the points between are split into equal buckets; from each bucket the point that forms the largest
 * triangle with the point kept from the previous bucket and the mean of the next bucket is kept.
 *
 * Our addition, for monitoring (a peak must never vanish from a chart): each bucket also keeps its
 * point of largest |value|, and the global maximum and minimum are always kept. So that the output
 * never exceeds `maxPoints`, the number of buckets is ⌊(maxPoints − 4) / 2⌋: two points per bucket
 * plus first, last, global max and global min. Duplicates are merged, so the output is often shorter.
 *
 * Pure: reads `t` and `v` (same length, `t` increasing), returns the kept indices in increasing order.
 * Non-finite values are the caller's to remove first.
 */

/** Indices of the points to keep, increasing; every index when `maxPoints >= n`. */
export function downsampleIndices(t: Float64Array, v: Float64Array, maxPoints: number): Uint32Array {
  const n = t.length;
  if (v.length !== n) throw new RangeError("downsampleIndices: t and v differ in length");
  if (!Number.isInteger(maxPoints) || maxPoints < 4) throw new RangeError(`downsampleIndices: maxPoints must be an integer ≥ 4, got ${maxPoints}`);
  if (n <= maxPoints) {
    const all = new Uint32Array(n);
    for (let i = 0; i < n; i++) all[i] = i;
    return all;
  }
  const keep = new Uint8Array(n);
  keep[0] = 1;
  keep[n - 1] = 1;
  let iMax = 0;
  let iMin = 0;
  for (let i = 1; i < n; i++) {
    if (v[i] > v[iMax]) iMax = i;
    if (v[i] < v[iMin]) iMin = i;
  }
  keep[iMax] = 1;
  keep[iMin] = 1;

  const buckets = Math.floor((maxPoints - 4) / 2);
  if (buckets > 0) {
    // Interior points 1 … n−2 split into `buckets` ranges [start, end).
    const inner = n - 2;
    const size = inner / buckets;
    let a = 0; // index kept from the previous bucket
    for (let b = 0; b < buckets; b++) {
      const start = 1 + Math.floor(b * size);
      const end = b === buckets - 1 ? n - 1 : 1 + Math.floor((b + 1) * size);
      // Mean of the next bucket (or the last point for the final bucket).
      let avgT: number;
      let avgV: number;
      if (b === buckets - 1) {
        avgT = t[n - 1];
        avgV = v[n - 1];
      } else {
        const nStart = end;
        const nEnd = b + 1 === buckets - 1 ? n - 1 : 1 + Math.floor((b + 2) * size);
        let st = 0;
        let sv = 0;
        for (let j = nStart; j < nEnd; j++) {
          st += t[j];
          sv += v[j];
        }
        const cnt = nEnd - nStart;
        avgT = st / cnt;
        avgV = sv / cnt;
      }
      const ta = t[a];
      const va = v[a];
      let best = -1;
      let bestArea = -1;
      let peak = start;
      for (let j = start; j < end; j++) {
        // Twice the triangle area (the factor ½ does not change the choice).
        const area = Math.abs((ta - avgT) * (v[j] - va) - (ta - t[j]) * (avgV - va));
        if (area > bestArea) {
          bestArea = area;
          best = j;
        }
        if (Math.abs(v[j]) > Math.abs(v[peak])) peak = j;
      }
      if (best >= 0) {
        keep[best] = 1;
        keep[peak] = 1;
        a = best;
      }
    }
  }
  let count = 0;
  for (let i = 0; i < n; i++) count += keep[i];
  const out = new Uint32Array(count);
  let k = 0;
  for (let i = 0; i < n; i++) if (keep[i]) out[k++] = i;
  return out;
}
