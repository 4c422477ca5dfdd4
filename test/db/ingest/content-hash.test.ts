/**
 * The epoch content hash is stored with every epoch and compared on every later post of the same
 * time (idempotency, 409): its bytes must stay exactly as documented in lib/server/ingest/service.ts,
 * or every stored epoch would look changed. SHA-256 of the documented text, computed here with
 * node:crypto (FIPS 180-4 through OpenSSL), one line per observation in code-unit order of the codes.
 */
import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { epochContentHash } from "../../../lib/server/ingest/content-hash.ts";

const obs = (point: string, east: number) => ({ point, east, north: 2000.5, height: -0, sigmaEast: 0.001, sigmaNorth: 0.001, sigmaHeight: 0.0025 });

describe("epoch content hash", () => {
  it("is SHA-256 of the sorted tab-separated lines, whatever the input order", () => {
    const text = "A\t1000.25\t2000.5\t0\t0.001\t0.001\t0.0025\nB\t-3e-7\t2000.5\t0\t0.001\t0.001\t0.0025\na\t5\t2000.5\t0\t0.001\t0.001\t0.0025\n";
    const want = createHash("sha256").update(text).digest("hex");
    expect(epochContentHash([obs("a", 5), obs("B", -3e-7), obs("A", 1000.25)])).toBe(want);
    expect(epochContentHash([obs("A", 1000.25), obs("a", 5), obs("B", -3e-7)])).toBe(want);
  });

  it("changes with any coordinate or σ, by one unit in the last place too", () => {
    const base = [obs("P1", 1), obs("P2", 2)];
    const h = epochContentHash(base);
    expect(epochContentHash([obs("P1", 1), { ...obs("P2", 2), east: 2 + 2 ** -51 }])).not.toBe(h);
    expect(epochContentHash([obs("P1", 1), { ...obs("P2", 2), sigmaHeight: 0.0026 }])).not.toBe(h);
    expect(epochContentHash([obs("P1", 1), obs("P2", 2)])).toBe(h);
  });
});
