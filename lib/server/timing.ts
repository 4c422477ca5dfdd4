/**
 * Phase timings of one request, for the `Server-Timing` response header (W3C Server Timing:
 * `name;dur=milliseconds, …`), which browsers' network panels and the ingest benchmark read.
 *
 *   const t = new PhaseTimer(); …; t.lap("parse"); …; t.lap("store"); res.headers.set("Server-Timing", t.header());
 *
 * A lap is the time since the previous lap (or since the timer was made). Laps of the same name add up.
 */
export class PhaseTimer {
  private last = performance.now();
  private readonly order: string[] = [];
  private readonly ms = new Map<string, number>();

  lap(name: string): void {
    const now = performance.now();
    if (!this.ms.has(name)) this.order.push(name);
    this.ms.set(name, (this.ms.get(name) ?? 0) + (now - this.last));
    this.last = now;
  }

  /** Phases in first-lap order, milliseconds. */
  phases(): { name: string; ms: number }[] {
    return this.order.map((name) => ({ name, ms: this.ms.get(name) as number }));
  }

  /** The header value; names are tokens (letters, digits, `-`, `_`), durations to 0.1 ms. */
  header(): string {
    return this.phases()
      .map((p) => `${p.name.replace(/[^A-Za-z0-9_-]/g, "_")};dur=${p.ms.toFixed(1)}`)
      .join(", ");
  }
}

/** Parses a `Server-Timing` value back into name → milliseconds (entries without `dur` are skipped). */
export function parseServerTiming(value: string | null): Map<string, number> {
  const out = new Map<string, number>();
  if (!value) return out;
  for (const entry of value.split(",")) {
    const [name, ...params] = entry.trim().split(";");
    const dur = params.map((p) => p.trim()).find((p) => p.startsWith("dur="));
    if (name && dur) out.set(name.trim(), Number(dur.slice(4)));
  }
  return out;
}
