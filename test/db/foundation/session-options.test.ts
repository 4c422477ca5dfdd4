/**
 * Every connection the application opens runs with PostgreSQL's JIT off (SESSION_OPTIONS in
 * lib/server/db/client.ts says why: compiling the ingest's classification query cost 150–200 ms per
 * request once a site held a few thousand epochs; the PostgreSQL documentation, "JIT Compilation",
 * "When to JIT?", says JIT pays off for long-running CPU-bound queries and costs short ones). Both
 * pools are checked: Prisma's and the plain `pg` one of the ingest and alert hot paths.
 */
import { describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { pgQuery, withPgTransaction } from "../../../lib/server/ingest/pg-tx.ts";

describe("session options", () => {
  it("Prisma's connections and the ingest pool's run with jit = off", async () => {
    expect(await getDb().$queryRawUnsafe<{ jit: string }[]>("SHOW jit")).toEqual([{ jit: "off" }]);
    expect(await pgQuery<{ jit: string }>("SHOW jit")).toEqual([{ jit: "off" }]);
    expect(await withPgTransaction((tx) => tx.query<{ jit: string }>("SHOW jit"))).toEqual([{ jit: "off" }]);
  });
});
