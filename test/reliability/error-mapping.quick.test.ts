/**
 * errorResponse (lib/server/http/route.ts) answers 503 `unavailable` for a lost or refused database
 * connection instead of a raw 500. The error shapes are the ones Prisma 7.10 with @prisma/adapter-pg
 * threw here against a closed port (P1001 from a transaction, P2010 from a raw query with the
 * adapter's `DatabaseNotReachable` kind), PostgreSQL's admin_shutdown (57P01) and pg's
 * "Connection terminated unexpectedly".
 */
import { describe, expect, it } from "vitest";
import { errorResponse, isDatabaseUnavailable } from "../../lib/server/http/route.ts";

const adapter = { driverAdapterError: { name: "DriverAdapterError", cause: { kind: "DatabaseNotReachable", host: "127.0.0.1", port: 1 } } };
const shapes: [string, unknown][] = [
  ["Prisma P1001", Object.assign(new Error("Can't reach database server at 127.0.0.1:1"), { code: "P1001", meta: adapter })],
  ["Prisma P2010 raw query with DatabaseNotReachable", Object.assign(new Error("Raw query failed. Code: `N/A`."), { code: "P2010", meta: adapter })],
  ["PostgreSQL 57P01 admin_shutdown via the adapter", Object.assign(new Error("x"), { code: "P2010", meta: { driverAdapterError: { cause: { kind: "postgres", originalCode: "57P01" } } } })],
  ["pg Connection terminated unexpectedly", new Error("Connection terminated unexpectedly")],
  ["socket ECONNREFUSED as a cause", Object.assign(new Error("fetch failed"), { cause: Object.assign(new Error("connect ECONNREFUSED"), { code: "ECONNREFUSED" }) })],
];

describe("errorResponse for database outages", () => {
  it.each(shapes)("%s answers 503 unavailable with a message naming the database and Retry-After", async (_n, err) => {
    expect(isDatabaseUnavailable(err)).toBe(true);
    const r = errorResponse(err);
    expect(r.status).toBe(503);
    expect(r.headers.get("retry-after")).toBe("5");
    const body = (await r.json()) as { error: { code: string; message: string } };
    expect(body.error.code).toBe("unavailable");
    expect(body.error.message).toMatch(/database is not reachable/);
  });

  it("an unrelated error (unique violation P2002, a TypeError) stays a generic 500", async () => {
    for (const err of [Object.assign(new Error("Unique constraint failed"), { code: "P2002" }), new TypeError("x is undefined")]) {
      expect(isDatabaseUnavailable(err)).toBe(false);
      const orig = console.error;
      console.error = () => undefined;
      try {
        expect(errorResponse(err).status).toBe(500);
      } finally {
        console.error = orig;
      }
    }
  });
});
