/**
 * Signing in through the real form on the production build (Chromium), and the redirects that
 * protect pages. Users are inserted straight into the e2e database with a bcrypt hash; nothing
 * here depends on the demo data.
 */
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import pg from "pg";
import { createHash } from "node:crypto";
import bcrypt from "bcryptjs";
import { chromium, type Browser } from "playwright-core";

const baseUrl = inject("baseUrl");
const chromiumPath = inject("chromiumPath");
const PASSWORD = "e2e sign-in password";
const tag = `${process.pid.toString(36)}${Date.now().toString(36)}`;
const userEmail = `e2e-user-${tag}@example.test`;
const adminEmail = `e2e-admin-${tag}@example.test`;
const siteSlug = `e2e-tokens-${tag}`;

let browser: Browser | null = null;

beforeAll(async () => {
  const c = new pg.Client({ connectionString: inject("e2eDatabaseUrl") });
  await c.connect();
  try {
    const hash = await bcrypt.hash(PASSWORD, 10);
    await c.query(`insert into "User"(email, name, "passwordHash", "isAdmin") values ($1, 'E2E User', $2, false), ($3, 'E2E Admin', $2, true)`, [userEmail, hash, adminEmail]);
    await c.query(`insert into "Site"(slug, name, "timeZone") values ($1, 'E2E token site', 'Europe/Zurich')`, [siteSlug]);
  } finally {
    await c.end();
  }
  if (chromiumPath)
    browser = await chromium.launch({
      executablePath: chromiumPath,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    });
});

afterAll(async () => {
  await browser?.close();
});

describe("protected pages over HTTP", () => {
  it("GET /account without a session redirects to /sign-in?next=/account", async () => {
    const r = await fetch(`${baseUrl}/account`, { redirect: "manual" });
    expect([303, 307, 308]).toContain(r.status);
    const loc = new URL(r.headers.get("location") ?? "", baseUrl);
    expect(loc.pathname).toBe("/sign-in");
    expect(loc.searchParams.get("next")).toBe("/account");
  });

  it("GET /admin and a site's token page without a session redirect to /sign-in", async () => {
    for (const path of ["/admin", "/admin/audit", `/sites/${siteSlug}/settings/tokens`]) {
      const r = await fetch(`${baseUrl}${path}`, { redirect: "manual" });
      expect(new URL(r.headers.get("location") ?? "/", baseUrl).pathname, path).toBe("/sign-in");
    }
  });

  it("the sign-in page carries the security headers (CSP, frame denial, nosniff) and no-one's secret", async () => {
    const r = await fetch(`${baseUrl}/sign-in`);
    expect(r.status).toBe(200);
    expect(r.headers.get("content-security-policy")).toContain("frame-ancestors 'none'");
    expect(r.headers.get("content-security-policy")).toContain("default-src 'self'");
    expect(r.headers.get("x-frame-options")).toBe("DENY");
    expect(r.headers.get("x-content-type-options")).toBe("nosniff");
    const html = await r.text();
    expect(html).toContain('name="password"');
    expect(html).not.toContain("passwordHash");
  });

  it("GET /api/v1/me without a session answers 401 JSON", async () => {
    const r = await fetch(`${baseUrl}/api/v1/me`);
    expect(r.status).toBe(401);
  });
});

describe.skipIf(!chromiumPath)("sign-in form in Chromium", () => {
  it("an unauthenticated visit to /account lands on the sign-in form; signing in with the keyboard reaches /account", async () => {
    const ctx = await browser!.newContext();
    const page = await ctx.newPage();
    await page.goto(`${baseUrl}/account`);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    // The e-mail field has focus on load; type, Tab to the password, Enter submits.
    await page.keyboard.type(userEmail);
    await page.keyboard.press("Tab");
    await page.keyboard.type(PASSWORD);
    await Promise.all([page.waitForURL(/\/account$/), page.keyboard.press("Enter")]);
    await expect(page.locator("h1").textContent()).resolves.toBe("Your account");
    expect(await page.locator("header.topbar").textContent()).toContain(userEmail);
    expect(await page.locator("header.topbar").textContent()).not.toContain("Admin");
    const cookie = (await ctx.cookies()).find((c) => c.name === "epochal_session");
    expect(cookie?.httpOnly).toBe(true);
    expect(cookie?.sameSite).toBe("Lax");
    expect(cookie?.secure).toBe(false);
    expect(cookie?.expires).toBeGreaterThan(Date.now() / 1000);

    // A user without administrator rights is sent to the "not allowed" page.
    await page.goto(`${baseUrl}/admin`);
    expect(new URL(page.url()).pathname).toBe("/account/denied");

    // Sign out (POST), then the protected page redirects again.
    await page.goto(`${baseUrl}/account`);
    await Promise.all([page.waitForURL(/\/sign-in/), page.getByRole("button", { name: "Sign out" }).click()]);
    await page.goto(`${baseUrl}/account`);
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    await ctx.close();
  });

  it("a wrong password shows an error on the form and sets no session", async () => {
    const ctx = await browser!.newContext();
    const page = await ctx.newPage();
    await page.goto(`${baseUrl}/sign-in`);
    await page.fill("#email", userEmail);
    await page.fill("#password", "not the password");
    await Promise.all([page.waitForURL(/error=wrong/), page.click("button[type=submit]")]);
    expect(await page.locator("#sign-in-error").textContent()).toMatch(/wrong/);
    expect((await ctx.cookies()).some((c) => c.name === "epochal_session")).toBe(false);
    await ctx.close();
  });

  it("an administrator creates a site token: the secret is shown once, the list keeps only its prefix", async () => {
    const ctx = await browser!.newContext();
    const page = await ctx.newPage();
    await page.goto(`${baseUrl}/sign-in?next=${encodeURIComponent(`/sites/${siteSlug}/settings/tokens`)}`);
    await page.fill("#email", adminEmail);
    await page.fill("#password", PASSWORD);
    await Promise.all([page.waitForURL(/\/settings\/tokens$/), page.click("button[type=submit]")]);
    await page.fill("#token-name", "e2e logger");
    await page.click("text=Create token");
    const secret = (await page.locator(".secret").textContent({ timeout: 15_000 }))?.trim() ?? "";
    expect(secret).toMatch(/^ept_/);
    const c = new pg.Client({ connectionString: inject("e2eDatabaseUrl") });
    await c.connect();
    const rows = await c.query(`select t.scope, t.prefix, t."createdBy" from "ApiToken" t join "Site" s on s.id = t."siteId" where s.slug = $1 and t."tokenHash" = $2`, [
      siteSlug,
      createHash("sha256").update(secret).digest("hex"),
    ]);
    await c.end();
    expect(rows.rows).toEqual([{ scope: "ingest", prefix: secret.slice(0, 12), createdBy: `user:${adminEmail}` }]);
    await page.reload();
    const html = await page.content();
    expect(html).not.toContain(secret);
    expect(html).toContain(secret.slice(0, 12));
    await ctx.close();
  });
});
