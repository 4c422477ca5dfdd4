/** Quick load run (CI): 5 concurrent clients × 20 epochs; the full 20 × 100 run is load.test.ts. */
import { describe, expect, it } from "vitest";
import { useServer } from "./support/harness.ts";
import { runLoad } from "./support/load.ts";
import { printFigures } from "./support/fixtures.ts";

const h = useServer("loadq");

describe("load (quick)", () => {
  it("5 clients × 20 mixed posts (new, duplicate, revision, conflict, shared): every response as expected, every observation stored exactly once", async () => {
    const { figures, problems } = await runLoad({ baseUrl: h.server.baseUrl, pool: h.pool, clients: 5, perClient: 20 });
    printFigures("load 5 × 20", figures);
    expect(problems).toEqual([]);
    expect(figures.requests).toBe(100);
    expect(figures.lost + figures.duplicated).toBe(0);
  });
});
