import { describe, expect, it, inject } from "vitest";

describe("GET /api/health on the production build", () => {
  it("answers 200 with the database up and the applied migration count", async () => {
    const r = await fetch(`${inject("baseUrl")}/api/health`);
    expect(r.status).toBe(200);
    const body = (await r.json()) as { database: { state: string; appliedMigrations: number } };
    expect(body.database.state).toBe("up");
    expect(body.database.appliedMigrations).toBeGreaterThanOrEqual(1);
  });

  it("sends the security headers on every response", async () => {
    const r = await fetch(`${inject("baseUrl")}/api/health`);
    expect(r.headers.get("x-frame-options")).toBe("DENY");
    expect(r.headers.get("x-content-type-options")).toBe("nosniff");
    expect(r.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
  });
});
