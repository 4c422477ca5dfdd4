/**
 * The mail-recipient section of the trigger-rules set-up page in Chromium (production build): added,
 * changed and removed with the keyboard alone, errors shown on the form or the row they belong to.
 * Makes its own site and engineer in the e2e database.
 */
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import { mkdirSync } from "node:fs";
import { join } from "node:path";
import pg from "pg";
import bcrypt from "bcryptjs";
import { chromium, type Browser, type Page } from "playwright-core";

const baseUrl = inject("baseUrl");
const chromiumPath = inject("chromiumPath");
const databaseUrl = inject("e2eDatabaseUrl");
const SHOTS = join(process.cwd(), "test-output", "screenshots");

async function sql<R extends pg.QueryResultRow>(text: string, values: unknown[] = []): Promise<R[]> {
  const c = new pg.Client({ connectionString: databaseUrl });
  await c.connect();
  try {
    return (await c.query<R>(text, values)).rows;
  } finally {
    await c.end();
  }
}

describe.skipIf(!chromiumPath)("mail recipients on the trigger-rules set-up page (Chromium)", () => {
  let browser: Browser;
  let page: Page;
  let slug: string;
  let siteId: number;

  beforeAll(async () => {
    slug = `rcpt-${Date.now().toString(36)}`;
    [{ id: siteId }] = await sql<{ id: number }>(`INSERT INTO "Site"(slug, name, "timeZone") VALUES ($1, 'Recipients test site', 'Europe/Berlin') RETURNING id`, [slug]);
    const email = `eng-${slug}@example.test`;
    const password = "recipients-test-password";
    const [u] = await sql<{ id: number }>(`INSERT INTO "User"(email, name, "passwordHash") VALUES ($1, $1, $2) RETURNING id`, [email, await bcrypt.hash(password, 4)]);
    await sql(`INSERT INTO "Membership"("userId", "siteId", role) VALUES ($1, $2, 'engineer')`, [u.id, siteId]);
    browser = await chromium.launch({
      executablePath: chromiumPath as string,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    });
    page = await (await browser.newContext({ viewport: { width: 1280, height: 900 } })).newPage();
    await page.goto(`${baseUrl}/sign-in?next=${encodeURIComponent(`/sites/${slug}/setup/rules`)}`);
    await page.fill("#email", email);
    await page.fill("#password", password);
    await page.press("#password", "Enter");
    await page.waitForURL((url) => url.pathname === `/sites/${slug}/setup/rules`, { timeout: 30_000 });
  });

  afterAll(async () => {
    await browser?.close();
  });

  it("adds a recipient with the keyboard, refuses the same address again on the form, and lists it", async () => {
    await expect(page.locator("#recipients-h").textContent()).resolves.toBe("Mail recipients (0)");
    await page.focus("#rcpt-email");
    await page.keyboard.type("Night.Shift@Example.test");
    await page.keyboard.press("Tab"); // → level
    await page.keyboard.press("ArrowDown"); // review → alert
    await page.keyboard.press("Tab"); // → digest
    await page.keyboard.press("Space");
    await page.keyboard.press("Enter");
    await expect(page.locator("form[aria-labelledby=recipient-new-h] [role=status]").textContent()).resolves.toBe("night.shift@example.test added: mails from alert, as a digest.");
    await expect(page.locator("#recipients-h").textContent()).resolves.toBe("Mail recipients (1)");
    // Focus is back in the address field, empty, for the next one.
    await expect(page.evaluate(() => document.activeElement?.id)).resolves.toBe("rcpt-email");
    await page.keyboard.type("NIGHT.SHIFT@example.test");
    await page.keyboard.press("Enter");
    await expect(page.locator("form[aria-labelledby=recipient-new-h] [role=alert]").textContent()).resolves.toMatch(/^email: already a recipient on this site/);
    mkdirSync(SHOTS, { recursive: true });
    await page.screenshot({ path: join(SHOTS, "e2e-setup-recipients.png"), fullPage: true });
    const rows = await sql<{ email: string; minLevel: string; digest: boolean }>(`SELECT email, "minLevel", digest FROM "MailRecipient" WHERE "siteId" = $1`, [siteId]);
    expect(rows).toEqual([{ email: "night.shift@example.test", minLevel: "alert", digest: true }]);
  });

  it("changes a row's level with the keyboard (Enter saves that row) and shows a row's own error", async () => {
    const row = page.locator("li[data-recipient='night.shift@example.test']");
    await row.locator("select[name=minLevel]").focus();
    await page.keyboard.press("ArrowDown"); // alert → limit
    await page.keyboard.press("Enter");
    await expect(row.locator("[role=status]").textContent()).resolves.toBe("Saved");
    const [saved] = await sql<{ minLevel: string }>(`SELECT "minLevel" FROM "MailRecipient" WHERE "siteId" = $1`, [siteId]);
    expect(saved.minLevel).toBe("limit");
    // Removed meanwhile (another engineer, the CLI): saving the row says so on that row.
    await sql(`DELETE FROM "MailRecipient" WHERE "siteId" = $1`, [siteId]);
    await row.locator("input[name=digest]").focus();
    await page.keyboard.press("Space");
    await page.keyboard.press("Enter");
    await expect(row.locator("[role=alert]").textContent()).resolves.toMatch(/^No mail recipient \d+ on this site\.$/);
  });

  it("removes a recipient after a confirmation, with the keyboard", async () => {
    await sql(`INSERT INTO "MailRecipient"("siteId", email, "minLevel", digest) VALUES ($1, 'day.shift@example.test', 'review', false)`, [siteId]);
    await page.reload();
    const row = page.locator("li[data-recipient='day.shift@example.test']");
    await row.locator("button:has-text('Remove…')").focus();
    await page.keyboard.press("Enter");
    // The confirming button takes the focus; Enter removes.
    await expect(page.evaluate(() => document.activeElement?.textContent)).resolves.toBe("Remove day.shift@example.test");
    await page.keyboard.press("Enter");
    await expect(page.locator("form[aria-labelledby=recipient-new-h] [role=status]").textContent()).resolves.toBe("day.shift@example.test removed; no more mails go to this address.");
    await expect(row.count()).resolves.toBe(0);
    await expect(sql(`SELECT 1 FROM "MailRecipient" WHERE "siteId" = $1 AND email = 'day.shift@example.test'`, [siteId])).resolves.toEqual([]);
    // The page's changes were audited: the add and the level change of night.shift, the removal of day.shift (its row was inserted here directly).
    const audit = await sql<{ action: string }>(`SELECT action FROM "AuditEntry" WHERE "siteId" = $1 AND "entityType" = 'MailRecipient' ORDER BY id`, [siteId]);
    expect(audit.map((a) => a.action)).toEqual(["recipient.create", "recipient.update", "recipient.delete"]);
  });
});
