"use client";
/** Step or play through epochs; compare cumulative (against the reference) or the increment between two epochs. */

/** Up to about 300 epochs to compare from: evenly spread over the history, plus the few before the shown one and the current choice. */
function fromChoices(n: number, index: number, fromIndex: number): number[] {
  if (n <= 300) return Array.from({ length: n }, (_, i) => i);
  const last = n - 1;
  const picks = new Set<number>([fromIndex, ...Array.from({ length: 280 }, (_, j) => Math.round((j * last) / 279))]);
  for (let d = 1; d <= 10; d++) if (index - d >= 0) picks.add(index - d);
  return [...picks].filter((i) => i >= 0 && i <= last).sort((a, b) => a - b);
}

export function EpochScrubber(p: {
  /** Formats a UTC ms time on the site's clock. */
  fmtTime: (ms: number) => string;
  epochIds: number[];
  epochTimesMs: number[];
  referenceEpochId: number | null;
  index: number;
  onIndex: (i: number) => void;
  playing: boolean;
  onPlay: (p: boolean) => void;
  compare: "cumulative" | "increment";
  onCompare: (c: "cumulative" | "increment") => void;
  fromIndex: number;
  onFromIndex: (i: number) => void;
  loading: boolean;
}) {
  const last = p.epochIds.length - 1;
  const t = p.epochTimesMs[p.index];
  const refIndex = p.referenceEpochId === null ? 0 : Math.max(0, p.epochIds.indexOf(p.referenceEpochId));
  return (
    <div className="scrubber no-print" role="group" aria-label="Epoch">
      <div className="scrubber-row">
        <button type="button" className="secondary small" onClick={() => p.onIndex(Math.max(0, p.index - 1))} disabled={p.index <= 0} aria-label="Previous epoch">
          ◀ Prev
        </button>
        <button type="button" className="small" onClick={() => p.onPlay(!p.playing)} aria-pressed={p.playing}>
          {p.playing ? "❚❚ Pause" : "▶ Play"}
        </button>
        <button type="button" className="secondary small" onClick={() => p.onIndex(Math.min(last, p.index + 1))} disabled={p.index >= last} aria-label="Next epoch">
          Next ▶
        </button>
        <input
          type="range"
          min={0}
          max={Math.max(0, last)}
          value={p.index}
          onChange={(e) => p.onIndex(Number(e.target.value))}
          aria-label="Epoch"
          aria-valuetext={t !== undefined ? p.fmtTime(t) : ""}
          className="scrubber-range"
        />
        <output className="scrubber-time" aria-live="polite" data-testid="epoch-time">
          {t !== undefined ? p.fmtTime(t) : "–"} <span className="muted">({p.index + 1} of {p.epochIds.length})</span>
          {p.loading ? <span className="muted"> · loading</span> : null}
        </output>
      </div>
      <div className="scrubber-row">
        <label className="check">
          <input type="radio" name="compare" checked={p.compare === "cumulative"} onChange={() => p.onCompare("cumulative")} /> Cumulative since the reference epoch
          {p.epochTimesMs[refIndex] !== undefined ? ` (${p.fmtTime(p.epochTimesMs[refIndex])})` : ""}
        </label>
        <label className="check">
          <input type="radio" name="compare" checked={p.compare === "increment"} onChange={() => p.onCompare("increment")} /> Increment since
        </label>
        {p.compare === "increment" ? (
          <select value={p.fromIndex} onChange={(e) => p.onFromIndex(Number(e.target.value))} aria-label="Compare from epoch">
            {fromChoices(p.epochIds.length, p.index, p.fromIndex).map((i) => (
              <option key={p.epochIds[i]} value={i}>
                {p.fmtTime(p.epochTimesMs[i])}
              </option>
            ))}
          </select>
        ) : (
          <span className="muted small">{p.epochTimesMs[p.fromIndex] !== undefined ? p.fmtTime(p.epochTimesMs[p.fromIndex]) : ""}</span>
        )}
      </div>
    </div>
  );
}
