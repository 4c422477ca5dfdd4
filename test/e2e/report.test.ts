/**
 * The report over HTTP on the production build: a signed-in engineer opens the reports page and the
 * printable report of the demo site (or, without the demo seed, of a small site made here through
 * the ingest API), every section is there, and the table's numbers are those of
 * GET /api/v1/sites/{slug}/elements/{id}/series. The PDF and an export come through the same server.
 */
import { beforeAll, describe, expect, it, inject } from "vitest";
import pg from "pg";
import bcrypt from "bcryptjs";
import { chromium } from "playwright-core";
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { hashSecret, newSecret } from "../../lib/server/auth/secrets.ts";

const baseUrl = inject("baseUrl");
const chromiumPath = inject("chromiumPath");
const DEMO_SLUG = "copperwick-lane";
const PASSWORD = "e2e report password";
const tag = `${process.pid.toString(36)}${Date.now().toString(36)}`;
const email = `e2e-report-${tag}@example.test`;

let slug = DEMO_SLUG;
let cookie = "";

async function signIn(): Promise<string> {
  const r = await fetch(`${baseUrl}/api/v1/session`, { method: "POST", headers: { "content-type": "application/json", origin: baseUrl }, body: JSON.stringify({ email, password: PASSWORD }) });
  expect(r.status).toBe(200);
  const set = r.headers.get("set-cookie") ?? "";
  return set.split(";")[0];
}

/** A small site of our own: 3 × 3 targets, 12 epochs at 6 h, one target moving east. */
async function makeOwnSite(c: pg.Client, userId: number): Promise<string> {
  const own = `e2e-report-${tag}`;
  const site = await c.query<{ id: number }>(`insert into "Site"(slug, name, "timeZone", "originLatDeg", "originLonDeg", "originHeightM") values ($1, 'E2E report site', 'Europe/Zurich', 47.37, 8.54, 400) returning id`, [own]);
  const siteId = site.rows[0].id;
  await c.query(`insert into "Membership"("userId", "siteId", role) values ($1, $2, 'engineer')`, [userId, siteId]);
  const token = newSecret("ept");
  await c.query(`insert into "ApiToken"("siteId", scope, "tokenHash", prefix, name) values ($1, 'ingest', $2, $3, 'e2e')`, [siteId, hashSecret(token), token.slice(0, 10)]);
  const t0 = Date.UTC(2026, 9, 1);
  const rows = ["point,east,north,height,time"];
  for (let k = 0; k < 12; k++)
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) rows.push(`Q${i}${j},${100 + 10 * i + (i === 1 && j === 1 ? 0.0006 * k : 0) + (j % 2) * 3},${200 + 10 * j},50,${new Date(t0 + k * 6 * 3600_000).toISOString()}`);
  const first = await fetch(`${baseUrl}/api/v1/sites/${own}/epochs`, { method: "POST", headers: { authorization: `Bearer ${token}`, "content-type": "text/csv" }, body: rows.slice(0, 10).join("\n") });
  expect(first.status).toBe(201);
  const sess = await signIn();
  const gen = await fetch(`${baseUrl}/api/v1/sites/${own}/elements`, { method: "POST", headers: { cookie: sess, origin: baseUrl, "content-type": "application/json" }, body: JSON.stringify({ generate: {} }) });
  expect(gen.status).toBeLessThan(300);
  const rest = await fetch(`${baseUrl}/api/v1/sites/${own}/epochs`, { method: "POST", headers: { authorization: `Bearer ${token}`, "content-type": "text/csv" }, body: [rows[0], ...rows.slice(10)].join("\n") });
  expect(rest.status).toBe(201);
  return own;
}

beforeAll(async () => {
  const c = new pg.Client({ connectionString: inject("e2eDatabaseUrl") });
  await c.connect();
  try {
    const u = await c.query<{ id: number }>(`insert into "User"(email, name, "passwordHash", "isAdmin") values ($1, 'E2E Reporter', $2, false) returning id`, [email, await bcrypt.hash(PASSWORD, 10)]);
    const demo = await c.query<{ id: number }>(`select id from "Site" where slug = $1`, [DEMO_SLUG]);
    if (demo.rows.length) await c.query(`insert into "Membership"("userId", "siteId", role) values ($1, $2, 'engineer')`, [u.rows[0].id, demo.rows[0].id]);
    else {
      console.warn("[e2e report] no demo site (seed/demo.ts did not seed): using a small site made through the ingest API");
      slug = await makeOwnSite(c, u.rows[0].id);
    }
  } finally {
    await c.end();
  }
  cookie = await signIn();
}, 300_000);

const attr = (html: string, name: string): string | null => new RegExp(`${name}="([^"]*)"`).exec(html)?.[1] ?? null;

describe("reports over HTTP", () => {
  it("GET /sites/{slug}/reports shows the period form with a 7-day default, the PDF button and the exports", async () => {
    const r = await fetch(`${baseUrl}/sites/${slug}/reports`, { headers: { cookie } });
    expect(r.status).toBe(200);
    const html = await r.text();
    expect(html).toContain("Open the report");
    const from = /id="from"[^>]*value="(\d{4}-\d{2}-\d{2})"/.exec(html)?.[1];
    const to = /id="to"[^>]*value="(\d{4}-\d{2}-\d{2})"/.exec(html)?.[1];
    expect(from && to).toBeTruthy();
    expect((Date.parse(to as string) - Date.parse(from as string)) / 86_400_000).toBe(6);
    for (const f of ["observations.csv", "observations.geojson", "results.csv", "elements.geojson"]) expect(html).toContain(`/api/v1/sites/${slug}/export/${f}`);
  });

  it("GET /sites/{slug}/reports/view has every section, and its element values equal the series API's", async () => {
    const r = await fetch(`${baseUrl}/sites/${slug}/reports/view`, { headers: { cookie } });
    expect(r.status).toBe(200);
    const html = await r.text();
    for (const s of ["title", "caution", "summary", "plan", "table", "charts", "alerts", "coverage"]) expect(html, s).toContain(`data-section="${s}"`);
    expect(html).toContain("never replace, the judgement of a licensed engineer");
    expect(html).toContain("E2E Reporter");
    const from = attr(html, "data-from") as string;
    const to = attr(html, "data-to") as string;
    expect(Date.parse(to) - Date.parse(from)).toBe(7 * 86_400_000);
    const rows = [...html.matchAll(/<tr data-element-id="(\d+)" data-value="([^"]*)" data-sigma="([^"]*)" data-time="([^"]*)"/g)];
    expect(rows.length).toBeGreaterThan(0);
    for (const [, id, value, sigma, time] of rows.slice(0, 4)) {
      const kind = new RegExp(`data-element-id="${id}"[\\s\\S]*?<span class="muted">(\\w+) ·`).exec(html)?.[1];
      const quantity = kind === "baseline" ? "engineering" : "greenMax";
      const s = await fetch(`${baseUrl}/api/v1/sites/${slug}/elements/${id}/series?${new URLSearchParams({ quantity, from, to, maxPoints: "400" })}`, { headers: { cookie } });
      expect(s.status).toBe(200);
      const pts = ((await s.json()) as { points: { t: string; value: number; sigma: number | null }[] }).points;
      const last = pts[pts.length - 1];
      expect(Number(value), `element ${id}`).toBe(last.value);
      expect(sigma === "" ? null : Number(sigma)).toBe(last.sigma);
      expect(time).toBe(last.t);
    }
    const received = Number(attr(html, "data-received"));
    const epochs = await fetch(`${baseUrl}/api/v1/sites/${slug}/epochs?${new URLSearchParams({ from, to, observations: "false", limit: "1000" })}`, { headers: { cookie } });
    expect(epochs.status).toBe(200);
    expect(((await epochs.json()) as { epochs: unknown[] }).epochs.length).toBe(received);
  });

  it("GET /api/v1/sites/{slug}/export/results.csv answers CSV with units in the header", async () => {
    const r = await fetch(`${baseUrl}/api/v1/sites/${slug}/export/results.csv`, { headers: { cookie } });
    expect(r.status).toBe(200);
    expect((await r.text()).split("\r\n")[0]).toContain("green_max_microstrain,sigma_green_max_microstrain");
  });

  it.skipIf(!chromiumPath)("GET /api/v1/sites/{slug}/report.pdf answers a PDF rendered by the server's Chromium", async () => {
    const r = await fetch(`${baseUrl}/api/v1/sites/${slug}/report.pdf`, { headers: { cookie } });
    expect(r.status).toBe(200);
    expect(r.headers.get("content-type")).toBe("application/pdf");
    const b = Buffer.from(await r.arrayBuffer());
    expect(b.subarray(0, 5).toString()).toBe("%PDF-");
    expect(b.length).toBeGreaterThan(10_000);
  });

  it.skipIf(!chromiumPath)("the report page printed by the browser hides the application bars and numbers its pages (CSS @page margin boxes)", async () => {
    const browser = await chromium.launch({
      executablePath: chromiumPath as string,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    });
    try {
      const ctx = await browser.newContext({ viewport: { width: 1280, height: 1000 } });
      const eq = cookie.indexOf("=");
      await ctx.addCookies([{ name: cookie.slice(0, eq), value: cookie.slice(eq + 1), url: baseUrl }]);
      const page = await ctx.newPage();
      const res = await page.goto(`${baseUrl}/sites/${slug}/reports/view`);
      expect(res?.status()).toBe(200);
      const dir = mkdtempSync(join(tmpdir(), "epochal-report-e2e-"));
      await page.screenshot({ path: join(dir, "screen.png") });
      await page.emulateMedia({ media: "print" });
      expect(await page.evaluate(() => getComputedStyle(document.querySelector(".topbar") as Element).display)).toBe("none");
      expect(await page.evaluate(() => getComputedStyle(document.querySelector(".rpt-caution") as Element).display)).not.toBe("none");
      const pdf = await page.pdf({ preferCSSPageSize: true, printBackground: true });
      writeFileSync(join(dir, "print.pdf"), pdf);
      if (spawnSync("pdftotext", ["-v"]).error === undefined) {
        const text = execFileSync("pdftotext", ["-layout", join(dir, "print.pdf"), "-"]).toString();
        expect(text).toMatch(/Page 1 of \d+/);
        expect(text).toContain("Monitoring report");
      } else console.warn("[e2e report] pdftotext not installed: page-number text not checked");
      console.log(`[e2e report] screenshot and browser print in ${dir}`);
    } finally {
      await browser.close();
    }
  });
});

describe("the CSV import page in Chromium", () => {
  it.skipIf(!chromiumPath)("maps another tool's columns (mm, own time format), shows errors at source lines, then stores the epoch through the ingest API", async () => {
    const own = `e2e-import-${tag}`;
    const c = new pg.Client({ connectionString: inject("e2eDatabaseUrl") });
    await c.connect();
    let siteId = 0;
    try {
      const site = await c.query<{ id: number }>(`insert into "Site"(slug, name, "timeZone") values ($1, 'E2E import site', 'Europe/Zurich') returning id`, [own]);
      siteId = site.rows[0].id;
      const u = await c.query<{ id: number }>(`select id from "User" where email = $1`, [email]);
      await c.query(`insert into "Membership"("userId", "siteId", role) values ($1, $2, 'surveyor')`, [u.rows[0].id, siteId]);
    } finally {
      await c.end();
    }
    const browser = await chromium.launch({
      executablePath: chromiumPath as string,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    });
    try {
      const ctx = await browser.newContext({ viewport: { width: 1280, height: 1100 } });
      const eq = cookie.indexOf("=");
      await ctx.addCookies([{ name: cookie.slice(0, eq), value: cookie.slice(eq + 1), url: baseUrl }]);
      const page = await ctx.newPage();
      expect((await page.goto(`${baseUrl}/sites/${own}/setup/import`))?.status()).toBe(200);
      const bad = "Pt,Y (mm),X (mm),Z (mm),When\nA1,2000000,1000000,100000,01.10.2026 08:00\nA2,2000000,oops,100000,01.10.2026 08:00\n";
      await page.setInputFiles("#file", { name: "other-tool.csv", mimeType: "text/csv", buffer: Buffer.from(bad) });
      await page.selectOption("#col-time", "When");
      await page.selectOption("#tf", "pattern");
      await page.fill("#tp", "dd.MM.yyyy HH:mm");
      await expect.poll(() => page.textContent("[data-testid=mapped-errors]")).toContain("line 3, X (mm)");
      expect(await page.isDisabled("[data-testid=import-upload]")).toBe(true);
      const good = "Pt,Y (mm),X (mm),Z (mm),When\nA1,2000000,1000000,100000,01.10.2026 08:00\nA2,2000000,1010000,100500,01.10.2026 08:00\nA3,2008660,1005000,101000,01.10.2026 08:00\n";
      await page.setInputFiles("#file", { name: "other-tool.csv", mimeType: "text/csv", buffer: Buffer.from(good) });
      await expect.poll(() => page.textContent("[data-testid=mapped-summary]")).toContain("3 rows converted");
      const dir = mkdtempSync(join(tmpdir(), "epochal-import-e2e-"));
      await page.screenshot({ path: join(dir, "import.png"), fullPage: true });
      await page.click("[data-testid=import-upload]");
      await expect.poll(() => page.textContent("[data-testid=import-status]"), { timeout: 20_000 }).toContain("Stored: 1 epoch");
      console.log(`[e2e report] import page screenshot in ${dir}`);
    } finally {
      await browser.close();
    }
    const c2 = new pg.Client({ connectionString: inject("e2eDatabaseUrl") });
    await c2.connect();
    try {
      const obs = await c2.query<{ code: string; east: number; north: number; height: number; time: Date }>(
        `select p.code, o.east, o.north, o.height, e.time from "Observation" o join "Epoch" e on e.id = o."epochId" join "Point" p on p.id = o."pointId" where e."siteId" = $1 order by p.code`,
        [siteId],
      );
      expect(obs.rows.map((r) => [r.code, r.east, r.north, r.height])).toEqual([["A1", 1000, 2000, 100], ["A2", 1010, 2000, 100.5], ["A3", 1005, 2008.66, 101]]);
      // 08:00 in Zurich on 1 October 2026 (CEST, UTC+02:00) is 06:00 UTC.
      expect(obs.rows[0].time.toISOString()).toBe("2026-10-01T06:00:00.000Z");
    } finally {
      await c2.end();
    }
  }, 120_000);
});
