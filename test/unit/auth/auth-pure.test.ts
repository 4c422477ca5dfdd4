import { describe, expect, it } from "vitest";
import { passwordProblem, PASSWORD_MAX_BYTES } from "../../../lib/server/auth/password.ts";
import { sessionSetCookie, wantsSecureCookie } from "../../../lib/server/auth/sessions.ts";
import { clientAddress, normaliseEmail } from "../../../lib/server/auth/signin.ts";
import { readJsonBody } from "../../../lib/server/http/body.ts";
import { auditCsvRow, auditSafe, AUDIT_CSV_COLUMNS } from "../../../lib/server/audit.ts";
import { hashSecret, newSecret } from "../../../lib/server/auth/secrets.ts";
import { expectedOutcome } from "../../support/access-table.ts";
import { isAppError } from "../../../lib/server/errors.ts";

async function codeOf(p: Promise<unknown>): Promise<string> {
  try {
    await p;
    return "resolved";
  } catch (e) {
    return isAppError(e) ? `${e.code}:${e.status}` : String(e);
  }
}

describe("passwordProblem", () => {
  it("refuses fewer than 10 characters and more than 72 UTF-8 bytes, accepts the rest", () => {
    expect(passwordProblem("123456789")).toMatch(/at least 10/);
    expect(passwordProblem("1234567890")).toBeNull();
    expect(passwordProblem("x".repeat(PASSWORD_MAX_BYTES))).toBeNull();
    // 25 × "€" (3 bytes each) = 75 bytes: bcrypt would truncate it silently.
    expect(passwordProblem("€".repeat(25))).toMatch(/72 bytes/);
  });
});

describe("session cookie", () => {
  it("sessionSetCookie sets HttpOnly, SameSite=Lax, Path=/ and an expiry; Secure only when asked", () => {
    const s = { secret: "eps_abc", expiresAt: new Date("2030-01-01T00:00:00Z") };
    const plain = sessionSetCookie(s, false);
    expect(plain).toMatch(/^epochal_session=eps_abc; /);
    expect(plain).toContain("HttpOnly");
    expect(plain).toContain("SameSite=Lax");
    expect(plain).toContain("Path=/");
    expect(plain).toContain("Expires=Tue, 01 Jan 2030 00:00:00 GMT");
    expect(plain).not.toContain("Secure");
    expect(sessionSetCookie(s, true)).toMatch(/; Secure$/);
    expect(sessionSetCookie(null, false)).toMatch(/^epochal_session=; .*Max-Age=0/);
  });

  it("wantsSecureCookie is true for https URLs, X-Forwarded-Proto https or EPOCHAL_SECURE_COOKIES=1, false on plain http", () => {
    const saved = process.env.EPOCHAL_SECURE_COOKIES;
    delete process.env.EPOCHAL_SECURE_COOKIES;
    try {
      expect(wantsSecureCookie("http://localhost:3000/api/v1/session", null)).toBe(false);
      expect(wantsSecureCookie("http://localhost:3000/api/v1/session", "http")).toBe(false);
      expect(wantsSecureCookie("https://monitor.example/api/v1/session", null)).toBe(true);
      expect(wantsSecureCookie("http://10.0.0.2:3000/", "https")).toBe(true);
      process.env.EPOCHAL_SECURE_COOKIES = "1";
      expect(wantsSecureCookie("http://localhost:3000/", null)).toBe(true);
    } finally {
      if (saved === undefined) delete process.env.EPOCHAL_SECURE_COOKIES;
      else process.env.EPOCHAL_SECURE_COOKIES = saved;
    }
  });
});

describe("secrets", () => {
  it("newSecret gives distinct prefixed secrets; hashSecret is SHA-256 hex (FIPS 180-4 test vector 'abc')", () => {
    const a = newSecret("ept");
    expect(a).toMatch(/^ept_[A-Za-z0-9_-]{32}$/);
    expect(newSecret("ept")).not.toBe(a);
    expect(hashSecret("abc")).toBe("ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
  });
});

describe("clientAddress and normaliseEmail", () => {
  it("clientAddress takes the right-most X-Forwarded-For entry (added by the nearest proxy), else X-Real-IP, else unknown", () => {
    expect(clientAddress(new Headers({ "x-forwarded-for": "1.2.3.4, 10.0.0.9" }))).toBe("10.0.0.9");
    expect(clientAddress(new Headers({ "x-real-ip": "192.0.2.1" }))).toBe("192.0.2.1");
    expect(clientAddress(new Headers())).toBe("unknown");
  });

  it("normaliseEmail trims and lower-cases", () => {
    expect(normaliseEmail("  Ann@Example.ORG ")).toBe("ann@example.org");
  });
});

describe("readJsonBody", () => {
  const req = (body: string, headers: Record<string, string> = { "content-type": "application/json" }) =>
    new Request("http://localhost/x", { method: "POST", body, headers });

  it("returns the parsed JSON of a body within the limit", async () => {
    expect(await readJsonBody(req('{"a":1}'), 100)).toEqual({ a: 1 });
  });

  it("answers 413 too_large for a body over the limit, by Content-Length and while streaming", async () => {
    expect(await codeOf(readJsonBody(req(JSON.stringify({ a: "x".repeat(200) })), 100))).toBe("too_large:413");
    const stream = new ReadableStream<Uint8Array>({
      start(c) {
        for (let i = 0; i < 10; i++) c.enqueue(new TextEncoder().encode('"' + "y".repeat(50) + '"'));
        c.close();
      },
    });
    const chunked = new Request("http://localhost/x", { method: "POST", body: stream, headers: { "content-type": "application/json" }, duplex: "half" } as RequestInit);
    expect(chunked.headers.get("content-length")).toBeNull();
    expect(await codeOf(readJsonBody(chunked, 100))).toBe("too_large:413");
  });

  it("answers 415 for a body that is not application/json and 400 for malformed or empty JSON", async () => {
    expect(await codeOf(readJsonBody(req('{"a":1}', { "content-type": "text/plain" }), 100))).toBe("unsupported_media_type:415");
    expect(await codeOf(readJsonBody(req("{a:1"), 100))).toBe("bad_request:400");
    expect(await codeOf(readJsonBody(req(""), 100))).toBe("bad_request:400");
  });
});

describe("audit CSV and auditSafe", () => {
  it("auditSafe drops secret-bearing fields at any depth and turns bigints into strings", () => {
    expect(auditSafe({ email: "a@b", passwordHash: "$2b$…", nested: { tokenHash: "h", n: 5n } })).toEqual({ email: "a@b", nested: { n: "5" } });
    expect(auditSafe(undefined)).toBeNull();
  });

  it("auditCsvRow quotes commas, quotes and newlines (RFC 4180) and neutralises formula cells", () => {
    expect(AUDIT_CSV_COLUMNS.join(",")).toBe("id,at_utc,actor,site,action,entity_type,entity_id,before,after");
    const row = auditCsvRow({
      id: "7",
      at: new Date("2026-03-01T12:00:00.5Z"),
      actor: "user:a@b.org",
      siteId: 1,
      siteSlug: "dam",
      action: "element.update",
      entityType: "Element",
      entityId: "=HYPERLINK(1)",
      before: { name: 'T "1", old\nline' },
      after: null,
    });
    expect(row).toBe('7,2026-03-01T12:00:00.500Z,user:a@b.org,dam,element.update,Element,\'=HYPERLINK(1),"{""name"":""T \\""1\\"", old\\nline""}",');
  });
});

describe("expectedOutcome (access table rules)", () => {
  it("maps anonymous to 401, tokens on user routes to 403, roles by rank, other sites to 403", () => {
    expect(expectedOutcome("read", { kind: "anonymous", name: "anonymous" })).toBe(401);
    expect(expectedOutcome("public", { kind: "anonymous", name: "anonymous" })).toBe("ok");
    expect(expectedOutcome("user", { kind: "token", name: "t", scope: "ingest", onOtherSite: false })).toBe(403);
    expect(expectedOutcome("ingest", { kind: "token", name: "t", scope: "read", onOtherSite: false })).toBe(403);
    expect(expectedOutcome("ingest", { kind: "token", name: "t", scope: "ingest", onOtherSite: true })).toBe(403);
    expect(expectedOutcome("manage-rules", { kind: "member", name: "s", role: "surveyor", onOtherSite: false })).toBe(403);
    expect(expectedOutcome("manage-rules", { kind: "member", name: "e", role: "engineer", onOtherSite: false })).toBe("ok");
    expect(expectedOutcome("read", { kind: "member", name: "a", role: "admin", onOtherSite: true })).toBe(403);
    expect(expectedOutcome("admin", { kind: "member", name: "a", role: "admin", onOtherSite: false })).toBe(403);
    expect(expectedOutcome("administer", { kind: "global-admin", name: "global administrator" })).toBe("ok");
  });
});
