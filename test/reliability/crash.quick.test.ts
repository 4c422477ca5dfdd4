/** One crash cycle (CI): the server is SIGKILLed once during a stream of ingests and started again. */
import { describe, expect, it } from "vitest";
import { useServer } from "./support/harness.ts";
import { runCrash } from "./support/crash.ts";
import { printFigures } from "./support/fixtures.ts";

const h = useServer("crashq");

describe("crash (quick)", () => {
  it("SIGKILL during ingest, restart: every epoch is wholly present or wholly absent, and the retrying clients end with each epoch stored once", async () => {
    const { figures, problems } = await runCrash({ server: h.server, pool: h.pool, kills: 1, epochsPerClient: 20 });
    printFigures("crash, 1 cycle", figures);
    expect(problems).toEqual([]);
    expect(figures.kills).toBe(1);
    expect(figures.lost + figures.duplicated + figures.partialEpochsSeen + figures.acknowledgedMissingAfterKill).toBe(0);
  });
});
