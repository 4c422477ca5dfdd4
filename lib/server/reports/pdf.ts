/**
 * The report as PDF: the report document (lib/server/reports/html.ts) rendered by headless Chromium
 * (Debian's /usr/bin/chromium, or EPOCHAL_CHROMIUM) through playwright-core, with page.setContent —
 * no second HTTP request and no session to forward. A4, running header (site, period) and footer
 * (who and when, "Page n of N") from Chromium's header and footer templates.
 * Without Chromium: AppError("unavailable") → 503 with a message saying how to install it.
 */
import { existsSync } from "node:fs";
import { AppError } from "../errors.ts";
import { esc, REPORT_PAGE_MARGIN } from "./html.ts";

export const CHROMIUM_ARGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"];

export function chromiumPath(): string | null {
  const p = process.env.EPOCHAL_CHROMIUM || "/usr/bin/chromium";
  // A runtime path, not a project file: keep the bundler from tracing the whole project for it.
  return existsSync(/*turbopackIgnore: true*/ p) ? p : null;
}

/** At most this long for one PDF (launch, layout, print). */
const PDF_TIMEOUT_MS = 60_000;

export async function renderPdf(documentHtml: string, texts: { headerText: string; footerText: string }): Promise<Uint8Array> {
  const executablePath = chromiumPath();
  if (!executablePath)
    throw new AppError("unavailable", "PDF reports need Chromium on the server, which is not installed (apt-get install -y chromium, or set EPOCHAL_CHROMIUM to its path). The printable report page works without it: print it from the browser.");
  const { chromium } = await import("playwright-core");
  const browser = await chromium.launch({ executablePath, args: CHROMIUM_ARGS, timeout: PDF_TIMEOUT_MS });
  try {
    const page = await browser.newPage();
    page.setDefaultTimeout(PDF_TIMEOUT_MS);
    // The document is self-contained (inline SVG and CSS): nothing to fetch.
    await page.route("**/*", (route) => (route.request().url().startsWith("data:") ? route.continue() : route.abort()));
    await page.setContent(documentHtml, { waitUntil: "load" });
    const style = "font-family: system-ui, sans-serif; font-size: 8px; color: #52606b; width: 100%; padding: 0 14mm; display: flex; justify-content: space-between;";
    const pdf = await page.pdf({
      format: "A4",
      printBackground: true,
      displayHeaderFooter: true,
      headerTemplate: `<div style="${style}"><span>${esc(texts.headerText)}</span></div>`,
      footerTemplate: `<div style="${style}"><span>${esc(texts.footerText)}</span><span>Page <span class="pageNumber"></span> of <span class="totalPages"></span></span></div>`,
      margin: REPORT_PAGE_MARGIN,
    });
    return new Uint8Array(pdf);
  } finally {
    await browser.close();
  }
}
