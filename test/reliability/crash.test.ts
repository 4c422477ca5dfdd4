/** Several crash cycles (on demand): SIGKILL at seeded random moments (RELIABILITY_SEED repeats a run). */
import { describe, expect, it } from "vitest";
import { useServer } from "./support/harness.ts";
import { runCrash } from "./support/crash.ts";
import { printFigures } from "./support/fixtures.ts";

const h = useServer("crash");

describe("crash", () => {
  it("8 SIGKILLs at random moments during ingest: every epoch is wholly present or wholly absent after each, and the retrying clients end with each epoch stored once", async () => {
    const { figures, problems } = await runCrash({ server: h.server, pool: h.pool, kills: 8, epochsPerClient: 100 });
    printFigures("crash, 8 cycles", figures);
    expect(problems).toEqual([]);
    expect(figures.kills).toBe(8);
    expect(figures.lost + figures.duplicated + figures.partialEpochsSeen + figures.acknowledgedMissingAfterKill).toBe(0);
  });
});
