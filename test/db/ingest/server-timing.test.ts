/**
 * POST …/epochs answers a Server-Timing header with the ingest phases (lib/server/timing.ts), whose
 * durations are real: each finite and non-negative, and together no longer than the request took.
 */
import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { parseServerTiming } from "../../../lib/server/timing.ts";
import { GRID, epochCsv, makeSite, post } from "./helpers.ts";

describe("Server-Timing on POST epochs", () => {
  it("names every phase of a stored epoch, results included, within the request's time", async () => {
    const s = await makeSite();
    await getDb().element.create({ data: { siteId: s.id, name: "T1", kind: "triangle", mode: "plan", pointCodes: ["P1", "P2", "P3"] } });
    const t0 = performance.now();
    const r = await post(s.slug, epochCsv("2024-07-01T00:00:00Z", GRID), { token: s.ingestToken });
    const elapsed = performance.now() - t0;
    expect(r.status).toBe(201);
    const phases = parseServerTiming(r.serverTiming);
    for (const name of ["auth", "parse", "bounds", "lock", "points", "classify", "epochs", "observations", "results-read", "results-compute", "results-insert", "audit", "commit", "after-commit"]) expect(phases.has(name), name).toBe(true);
    const total = [...phases.values()].reduce((a, b) => a + b, 0);
    for (const ms of phases.values()) expect(Number.isFinite(ms) && ms >= 0).toBe(true);
    // Each value is rounded to 0.1 ms in the header.
    expect(total).toBeLessThanOrEqual(elapsed + 0.05 * phases.size);
  });
});
