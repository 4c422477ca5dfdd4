/** Full load run (on demand, npm run reliability): 20 concurrent clients × 100 epochs each. */
import { describe, expect, it } from "vitest";
import { useServer } from "./support/harness.ts";
import { runLoad } from "./support/load.ts";
import { printFigures } from "./support/fixtures.ts";

const h = useServer("load");

describe("load", () => {
  it("20 clients × 100 mixed posts (new, duplicate, revision, conflict, shared): every response as expected, every observation stored exactly once", async () => {
    const { figures, problems } = await runLoad({ baseUrl: h.server.baseUrl, pool: h.pool, clients: 20, perClient: 100 });
    printFigures("load 20 × 100", figures);
    expect(problems).toEqual([]);
    expect(figures.requests).toBe(2000);
    expect(figures.lost + figures.duplicated).toBe(0);
  });
});
