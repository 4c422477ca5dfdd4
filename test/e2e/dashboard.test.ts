/**
 * The dashboard in a real browser (Debian's Chromium through playwright-core) against the production
 * build on the demo data (seed/demo.ts, loaded by the e2e global setup). When the demo site is not in
 * the database, the test makes a small site of its own through the e2e database and the ingest API.
 *
 * Screenshots of each main screen go to test-output/screenshots/ (git-ignored) for a person to look at.
 */
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import pg from "pg";
import bcrypt from "bcryptjs";
import { chromium, type Browser, type BrowserContext, type Page } from "playwright-core";

const baseUrl = inject("baseUrl");
const chromiumPath = inject("chromiumPath");
const databaseUrl = inject("e2eDatabaseUrl");
const SHOTS = join(process.cwd(), "test-output", "screenshots");

type Site = { slug: string; engineer: { email: string; password: string }; viewer: { email: string; password: string } };

/** The demo site if it is there; else a small site of our own: 12 points on a grid, 4 epochs of a stretching slab, triangles, a rule and an alert. */
async function findOrMakeSite(): Promise<Site> {
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    const demo = await c.query(`SELECT slug FROM "Site" WHERE slug = 'copperwick-lane'`);
    if (demo.rowCount) {
      return {
        slug: "copperwick-lane",
        engineer: { email: "engineer@demo.epochal.test", password: "demo-engineer-2026" },
        viewer: { email: "viewer@demo.epochal.test", password: "demo-viewer-2026" },
      };
    }
    const slug = `dash-${Date.now().toString(36)}`;
    const site = await c.query<{ id: number }>(`INSERT INTO "Site"(slug, name, "timeZone") VALUES ($1, 'Dashboard test slab', 'Europe/Berlin') RETURNING id`, [slug]);
    const siteId = site.rows[0].id;
    const password = "dashboard-test-password";
    const hash = await bcrypt.hash(password, 4);
    const mk = async (email: string, role: string) => {
      const u = await c.query<{ id: number }>(`INSERT INTO "User"(email, name, "passwordHash") VALUES ($1, $1, $2) RETURNING id`, [email, hash]);
      await c.query(`INSERT INTO "Membership"("userId", "siteId", role) VALUES ($1, $2, $3)`, [u.rows[0].id, siteId, role]);
    };
    await mk(`eng-${slug}@example.test`, "engineer");
    await mk(`view-${slug}@example.test`, "viewer");
    return { slug, engineer: { email: `eng-${slug}@example.test`, password }, viewer: { email: `view-${slug}@example.test`, password } };
  } finally {
    await c.end();
  }
}

/** Epochs, triangles, a rule and an alert for the fallback site, through the ingest and elements APIs. */
async function fillOwnSite(page: Page, slug: string): Promise<void> {
  const rows: string[] = ["point,east,north,height,time"];
  for (let k = 0; k < 4; k++) {
    const time = new Date(Date.UTC(2026, 5, 1 + k * 7)).toISOString();
    for (let j = 0; j < 3; j++)
      for (let i = 0; i < 4; i++) {
        const e = i * 15 + (j % 2) * 5;
        const n = j * 13;
        // East-west stretch growing 300 µε a week in the east half.
        const s = e > 20 ? 0.0003 * k * (e - 20) : 0;
        rows.push(`S${j}${i},${(1000 + e + s).toFixed(5)},${(2000 + n).toFixed(5)},100,${time}`);
      }
  }
  const headers = { Origin: baseUrl };
  const up = await page.request.post(`${baseUrl}/api/v1/sites/${slug}/epochs`, { headers: { ...headers, "Content-Type": "text/csv" }, data: rows.join("\n") + "\n" });
  expect(up.status()).toBe(201);
  const gen = await page.request.post(`${baseUrl}/api/v1/sites/${slug}/elements`, { headers: { ...headers, "Content-Type": "application/json" }, data: JSON.stringify({ generate: {} }) });
  expect(gen.status()).toBe(201);
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    const s = await c.query<{ id: number }>(`SELECT id FROM "Site" WHERE slug = $1`, [slug]);
    const els = await c.query<{ id: number }>(`SELECT id FROM "Element" WHERE "siteId" = $1`, [s.rows[0].id]);
    const ep = await c.query<{ id: number; time: Date }>(`SELECT id, time FROM "Epoch" WHERE "siteId" = $1 ORDER BY time DESC LIMIT 1`, [s.rows[0].id]);
    const rule = await c.query<{ id: number }>(
      `INSERT INTO "TriggerRule"("siteId", name, quantity, "elementIds", "reviewLevel", "alertLevel", "limitLevel") VALUES ($1, 'Slab tension', 'greenMax', $2::int[], 0.0005, 0.001, 0.002) RETURNING id`,
      [s.rows[0].id, `{${els.rows.map((e) => e.id).join(",")}}`],
    );
    await c.query(
      `INSERT INTO "Alert"("siteId", "ruleId", "elementId", level, "peakLevel", "openedAt", "openedEpochId", "lastEpochId", value, sigma, "isSignificant") VALUES ($1, $2, $3, 'alert', 'alert', $4, $5, $5, 0.0012, 0.0001, true)`,
      [s.rows[0].id, rule.rows[0].id, els.rows[0].id, ep.rows[0].time, ep.rows[0].id],
    );
  } finally {
    await c.end();
  }
}

async function signIn(ctx: BrowserContext, who: { email: string; password: string }, next = "/"): Promise<Page> {
  const page = await ctx.newPage();
  await page.goto(`${baseUrl}/sign-in?next=${encodeURIComponent(next)}`);
  await page.fill("#email", who.email);
  await page.fill("#password", who.password);
  // Forms submit with Enter.
  await page.press("#password", "Enter");
  await page.waitForURL((u) => !u.pathname.startsWith("/sign-in"), { timeout: 30_000 });
  return page;
}

async function planFills(page: Page): Promise<string[]> {
  return page.$$eval("section.plan svg .elements .el", (els) => els.map((e) => e.getAttribute("data-fill") ?? ""));
}

async function waitPlanReady(page: Page): Promise<void> {
  await page.waitForSelector('section.plan[data-ready="true"]', { timeout: 30_000 });
}

describe.skipIf(!chromiumPath)("dashboard in Chromium (production build)", () => {
  let browser: Browser;
  let ctx: BrowserContext;
  let page: Page;
  let site: Site;

  beforeAll(async () => {
    mkdirSync(SHOTS, { recursive: true });
    site = await findOrMakeSite();
    browser = await chromium.launch({
      executablePath: chromiumPath as string,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    });
    ctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    page = await signIn(ctx, site.engineer);
    if (site.slug !== "copperwick-lane") await fillOwnSite(page, site.slug);
  });

  afterAll(async () => {
    await browser?.close();
  });

  it("signing in lands on the sites overview with the caution, the site, its latest epoch and its open alerts", async () => {
    await page.goto(`${baseUrl}/`);
    await expect(page.locator(".caution").textContent()).resolves.toContain("never replace");
    const card = page.locator(".site-card", { has: page.locator(`a[href="/sites/${site.slug}"]`) });
    await expect(card.count()).resolves.toBe(1);
    const text = (await card.textContent()) ?? "";
    expect(text).toMatch(/Latest epoch\s*\d{4}-\d{2}-\d{2} \d{2}:\d{2} [+-]\d{2}:\d{2}/);
    expect(text).toMatch(/Points reported\s*\d+ of \d+/);
    expect(text).toMatch(/Largest major strain/);
    await page.screenshot({ path: join(SHOTS, "e2e-overview.png"), fullPage: true });
  });

  it("the site plan draws, shows the zone and reference epoch, and changing the quantity changes the colours", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}`);
    await waitPlanReady(page);
    await expect(page.locator("[data-testid=site-zone]").textContent()).resolves.toMatch(/\//);
    await expect(page.locator("[data-testid=site-reference]").textContent()).resolves.toMatch(/^\d{4}-\d{2}-\d{2}/);
    const before = await planFills(page);
    expect(before.length).toBeGreaterThan(3);
    // Extension and contraction differ in shape too: both kinds are tagged, contraction is hatched.
    await page.screenshot({ path: join(SHOTS, "e2e-plan.png"), fullPage: true });
    await page.selectOption("select[name=quantity]", "greenMin");
    await page.waitForSelector('section.plan[data-quantity="greenMin"]');
    const after = await planFills(page);
    expect(after).toHaveLength(before.length);
    expect(after.filter((f, i) => f !== before[i]).length).toBeGreaterThan(0);
    const signs = await page.$$eval("section.plan svg .elements .el", (els) => els.map((e) => e.getAttribute("data-sign")));
    expect(signs).toContain("contraction");
    await expect(page.locator('svg .elements path.hatch').count()).resolves.toBe(1);
  });

  it("the epoch scrubber steps back an epoch, fetches its field and shows its time; the increment mode compares two epochs", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}`);
    await waitPlanReady(page);
    const epoch0 = await page.locator("section.plan").getAttribute("data-epoch");
    const time0 = await page.locator("[data-testid=epoch-time]").textContent();
    const fieldResponse = page.waitForResponse((r) => r.url().includes("/field?") && r.status() === 200);
    await page.click("button[aria-label='Previous epoch']");
    await fieldResponse;
    await waitPlanReady(page);
    const epoch1 = await page.locator("section.plan").getAttribute("data-epoch");
    expect(epoch1).not.toBe(epoch0);
    await expect(page.locator("[data-testid=epoch-time]").textContent()).resolves.not.toBe(time0);
    // Keyboard on the range: End goes back to the latest epoch.
    await page.focus("input.scrubber-range");
    await page.keyboard.press("End");
    await waitPlanReady(page);
    const inc = page.waitForResponse((r) => r.url().includes("/field?") && r.url().includes("from=") && r.status() === 200);
    await page.check("input[name=compare] >> nth=1");
    const body = (await (await inc).json()) as { mode: string; elements: { id: number[] } };
    expect(body.mode).toBe("increment");
    expect(body.elements.id.length).toBeGreaterThan(0);
    await page.screenshot({ path: join(SHOTS, "e2e-plan-increment.png"), fullPage: false });
  });

  it("zooming with the keyboard and the reset button changes and restores the view box", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}`);
    await waitPlanReady(page);
    const svg = page.locator("section.plan svg.plan-svg");
    // The fitted view follows the drawing's size; take it from the reset button once the layout has settled.
    await page.click("text=Reset view");
    const home = await svg.getAttribute("viewBox");
    await svg.focus();
    await page.keyboard.press("+");
    await page.keyboard.press("ArrowLeft");
    expect(await svg.getAttribute("viewBox")).not.toBe(home);
    await page.click("text=Reset view");
    expect(await svg.getAttribute("viewBox")).toBe(home);
  });

  it("hovering an element shows its value with σ, and clicking it opens the element page with its chart", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}`);
    await waitPlanReady(page);
    const el = page.locator("section.plan svg .elements polygon.el").first();
    await el.hover({ force: true });
    await page.waitForSelector(".plan-tooltip");
    await expect(page.locator(".plan-tooltip").textContent()).resolves.toMatch(/±/);
    const id = await el.getAttribute("data-element");
    await el.click({ force: true });
    await page.waitForURL(new RegExp(`/sites/${site.slug}/elements/${id}$`));
    await page.waitForSelector("[data-testid=element-chart] canvas", { timeout: 30_000 });
    expect(Number(await page.locator("[data-testid=element-chart]").getAttribute("data-points"))).toBeGreaterThan(1);
    await expect(page.locator("h3", { hasText: "Green-Lagrange" }).count()).resolves.toBe(1);
    await expect(page.locator("h3", { hasText: "Euler-Almansi" }).count()).resolves.toBe(1);
    await expect(page.locator("h3", { hasText: "Small strain" }).count()).resolves.toBe(1);
    await page.screenshot({ path: join(SHOTS, "e2e-element.png"), fullPage: true });
  });

  it("an element with a trigger rule shows its levels on the chart, and the quantity can be changed", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}/alerts?state=all`);
    const link = page.locator("table.alerts tbody tr td a[href*='/elements/']").first();
    await link.click();
    await page.waitForSelector("[data-testid=element-chart] canvas", { timeout: 30_000 });
    await expect(page.locator("section.panel", { hasText: "Trigger rules on this element" }).locator("tbody tr").count()).resolves.toBeGreaterThan(0);
    await page.screenshot({ path: join(SHOTS, "e2e-element-with-rule.png"), fullPage: true });
    const options = await page.$$eval("select[name=chart-mode] option", (o) => o.map((x) => (x as HTMLOptionElement).value));
    expect(options).toContain("rate");
    const series = page.waitForResponse((r) => r.url().includes("/series?") && r.url().includes("mode=rate"));
    await page.selectOption("select[name=chart-mode]", "rate");
    expect((await series).status()).toBe(200);
  });

  it("an engineer acknowledges an open alert with a comment (Enter submits) and sees it recorded", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}/alerts`);
    await page.screenshot({ path: join(SHOTS, "e2e-alerts.png"), fullPage: true });
    const row = page.locator("table.alerts tbody tr", { has: page.locator("form.ack-form") }).first();
    const id = await row.getAttribute("data-alert-id");
    const input = row.locator("input[name=comment]");
    await input.fill("Checked on site: hairline crack at gable, photographed. e2e");
    await input.press("Enter");
    await page.waitForURL(/acked=/);
    await expect(page.locator(".notice").first().textContent()).resolves.toContain(`Alert ${id} acknowledged`);
    await expect(page.locator(`tr[data-alert-id="${id}"]`).textContent()).resolves.toContain("hairline crack at gable");
  });

  it("a viewer sees the alerts without the acknowledgement form", async () => {
    const vctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    try {
      const v = await signIn(vctx, site.viewer, `/sites/${site.slug}/alerts?state=all`);
      await v.waitForSelector("main h1");
      await expect(v.locator("form.ack-form").count()).resolves.toBe(0);
      // The server enforces the role anyway: the acknowledge API refuses a viewer.
      const r = await v.request.post(`${baseUrl}/api/v1/sites/${site.slug}/alerts/1/acknowledge`, { headers: { Origin: baseUrl, "Content-Type": "application/json" }, data: JSON.stringify({ comment: "x" }) });
      expect(r.status()).toBe(403);
    } finally {
      await vctx.close();
    }
  });

  it("uploading a file with a bad row names the line and field before anything is sent, and a server-side error is named too", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}/setup/upload`);
    const posts: string[] = [];
    page.on("request", (r) => {
      if (r.method() === "POST" && r.url().includes("/epochs")) posts.push(r.url());
    });
    const bad = "point,east,north,height,time\nX1,1000.0,2000.0,100,2026-06-02T00:00:00Z\nX2,not-a-number,2000.0,100,2026-06-02T00:00:00Z\n";
    await page.setInputFiles("#epoch-file", { name: "bad-epoch.csv", mimeType: "text/csv", buffer: Buffer.from(bad) });
    const errs = page.locator("[data-testid=row-errors] li");
    await errs.first().waitFor();
    const text = (await errs.allTextContents()).join("\n");
    expect(text).toMatch(/Line 3/);
    expect(text).toMatch(/east/);
    await expect(page.locator("button[type=submit]", { hasText: "Upload" }).isDisabled()).resolves.toBe(true);
    await page.screenshot({ path: join(SHOTS, "e2e-upload-error.png"), fullPage: true });
    expect(posts).toHaveLength(0);
    // Valid CSV, but a time the server refuses (long before 1980): the server's row error is shown with the file's line.
    const late = "point,east,north,height,time\n# a comment line\nX1,1000.0,2000.0,100,1970-01-02T00:00:00Z\n";
    await page.setInputFiles("#epoch-file", { name: "old-epoch.csv", mimeType: "text/csv", buffer: Buffer.from(late) });
    await page.click("button[type=submit]:has-text('Upload')");
    const serr = page.locator("[data-testid=server-errors] li");
    await serr.first().waitFor({ timeout: 30_000 });
    expect((await serr.allTextContents()).join("\n")).toMatch(/Line 3/);
    expect(posts.length).toBe(1);
    await page.screenshot({ path: join(SHOTS, "e2e-upload-server-error.png"), fullPage: true });
  });

  it("a change to a point goes through PATCH /points/{code} and shows on the set-up page", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}/setup/points`);
    const first = page.locator("form.points-row").first();
    const code = await first.getAttribute("data-point");
    await first.locator("input[name=group]").fill("e2e-group");
    const saved = page.waitForResponse((r) => r.url().includes(`/points/${encodeURIComponent(code as string)}`) && r.request().method() === "PATCH");
    await first.locator("input[name=group]").press("Enter");
    expect((await saved).status()).toBe(200);
    await expect(first.locator("[role=status]").textContent()).resolves.toBe("Saved");
    await page.reload();
    await expect(page.locator(`form.points-row[data-point="${code}"] input[name=group]`).inputValue()).resolves.toBe("e2e-group");
    await page.screenshot({ path: join(SHOTS, "e2e-setup-points.png") });
  });

  it("the elements set-up previews the triangulation on the plan without saving it", async () => {
    await page.goto(`${baseUrl}/sites/${site.slug}/setup/elements`);
    const preview = page.waitForResponse((r) => r.url().includes("/preview-triangulation"));
    await page.click("button:has-text('Preview')");
    expect((await preview).status()).toBe(200);
    await page.waitForSelector("[data-testid=preview-layer] polygon");
    await page.screenshot({ path: join(SHOTS, "e2e-setup-elements.png"), fullPage: true });
    await page.goto(`${baseUrl}/sites/${site.slug}/setup/rules`);
    await page.selectOption("#rule-preset", { index: 1 });
    await expect(page.locator("#rule-name").inputValue()).resolves.not.toBe("");
    await page.screenshot({ path: join(SHOTS, "e2e-setup-rules.png"), fullPage: true });
  });

  it("the plan reads on a tablet (820 px) and prints without its controls", async () => {
    const tctx = await browser.newContext({ viewport: { width: 820, height: 1180 } });
    try {
      const cookies = await ctx.cookies();
      await tctx.addCookies(cookies);
      const t = await tctx.newPage();
      await t.goto(`${baseUrl}/sites/${site.slug}`);
      await waitPlanReady(t);
      const width = await t.evaluate(() => document.documentElement.scrollWidth);
      expect(width).toBeLessThanOrEqual(822);
      await t.screenshot({ path: join(SHOTS, "e2e-plan-tablet.png"), fullPage: true });
      await t.emulateMedia({ media: "print" });
      await expect(t.locator(".plan-controls").isVisible()).resolves.toBe(false);
      await expect(t.locator("section.plan svg.plan-svg").isVisible()).resolves.toBe(true);
      await t.screenshot({ path: join(SHOTS, "e2e-plan-print.png"), fullPage: true });
    } finally {
      await tctx.close();
    }
  });
});
