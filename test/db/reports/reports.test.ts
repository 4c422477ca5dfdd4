/**
 * Reports, exports and the column mapping against a real database: a site built through the ingest,
 * element and alert services (fixtures.ts), the route handlers called in-process as Next.js would.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { getDb } from "../../../lib/server/db/client.ts";
import { SESSION_COOKIE } from "../../../lib/server/auth/secrets.ts";
import { GET as exportGet } from "../../../app/api/v1/sites/[slug]/export/[file]/route.ts";
import { GET as pdfGet } from "../../../app/api/v1/sites/[slug]/report.pdf/route.ts";
import * as mappingRoute from "../../../app/api/v1/sites/[slug]/column-mapping/route.ts";
import { POST as postEpochs } from "../../../app/api/v1/sites/[slug]/epochs/route.ts";
import { GET as seriesGet } from "../../../app/api/v1/sites/[slug]/elements/[id]/series/route.ts";
import { buildReportData } from "../../../lib/server/reports/data.ts";
import { renderReportHtml } from "../../../lib/server/reports/html.ts";
import { applyColumnMapping, type ColumnMapping } from "../../../lib/formats/mapped-csv.ts";
import { tokenizeCsv } from "../../../lib/formats/csv.ts";
import { call, sessionFor } from "../elements/fixtures.ts";
import { CYCLE_MS, EPOCHS, makeReportSite, ORIGIN, T0_MS, type ReportFixture } from "./fixtures.ts";
import { uniqueSlug } from "../../support/unique.ts";

const FULL = { fromMs: T0_MS, toMs: T0_MS + (EPOCHS - 1) * CYCLE_MS };
const FULL_Q = { from: new Date(FULL.fromMs).toISOString(), to: new Date(FULL.toMs).toISOString() };

let fx: ReportFixture;
let viewer: string;
let surveyor: string;

async function raw(handler: (req: Request, ctx: { params: Promise<Record<string, string>> }) => Promise<Response>, opts: { path: string; params: Record<string, string>; cookie: string; query?: Record<string, string>; method?: string; body?: string; type?: string }): Promise<Response> {
  const url = new URL(`http://epochal.test${opts.path}`);
  for (const [k, v] of Object.entries(opts.query ?? {})) url.searchParams.set(k, v);
  const headers = new Headers({ host: url.host, origin: url.origin, cookie: opts.cookie });
  if (opts.type) headers.set("content-type", opts.type);
  return handler(new Request(url, { method: opts.method ?? "GET", headers, body: opts.body }), { params: Promise.resolve(opts.params) });
}

const exportText = async (slug: string, file: string, cookie: string, query = FULL_Q): Promise<{ status: number; text: string; type: string | null }> => {
  const r = await raw(exportGet, { path: `/api/v1/sites/${slug}/export/${file}`, params: { slug, file }, cookie, query });
  return { status: r.status, text: await r.text(), type: r.headers.get("content-type") };
};

async function newSite(data: Record<string, unknown> = {}): Promise<{ id: number; slug: string; cookie: string }> {
  const slug = uniqueSlug("rpt-copy");
  const s = await getDb().site.create({ data: { slug, name: slug, timeZone: "Europe/Zurich", ...data } });
  return { id: s.id, slug, cookie: await sessionFor(s.id, "surveyor") };
}

async function coordinates(siteId: number): Promise<Map<string, { east: number; north: number; height: number; sigmaEast: number }>> {
  const rows = await getDb().observation.findMany({ where: { epoch: { siteId, isCurrent: true } }, include: { point: true, epoch: true } });
  return new Map(rows.map((o) => [`${o.epoch.time.toISOString()} ${o.point.code}`, { east: o.east, north: o.north, height: o.height, sigmaEast: o.sigmaEast }]));
}

beforeAll(async () => {
  fx = await makeReportSite();
  viewer = await sessionFor(fx.site.id, "viewer");
  surveyor = await sessionFor(fx.site.id, "surveyor");
}, 180_000);

describe("buildReportData and renderReportHtml", () => {
  it("renderReportHtml(buildReportData(site, period)) has every section, the caution and the title block", async () => {
    const d = await buildReportData(fx.site, FULL, { label: "Tester <t@example.test>" });
    const h = renderReportHtml(d, { marginBoxes: true });
    for (const s of ["title", "caution", "summary", "plan", "table", "charts", "alerts", "coverage"]) expect(h.body).toContain(`data-section="${s}"`);
    expect(h.body).toContain("Epochal&#39;s figures support, and never replace");
    expect(h.body).toContain("Tester &lt;t@example.test&gt;");
    expect(h.body).toContain(`data-reference-epoch="${fx.epochIds[0]}"`);
    expect(h.body).toContain(`data-end-epoch="${fx.epochIds[EPOCHS - 1]}"`);
    expect(h.body).toMatch(/<svg[^>]+class="static-plan"/);
    expect((h.body.match(/<svg[^>]+class="chart"/g) ?? []).length).toBe(d.elements.length);
    expect(h.css).toContain("counter(pages)");
    expect(renderReportHtml(d, { marginBoxes: false }).css).not.toContain("counter(pages)");
  });

  it("buildReportData shows the stretched triangles at their levels first, and the values equal GET …/elements/{id}/series", async () => {
    const d = await buildReportData(fx.site, FULL, { label: "t" });
    expect(d.elements.length).toBeGreaterThan(0);
    const first = d.elements[0];
    // The triangles around P11 stretch by up to 0.4 mm × 29 = 11.6 mm over ~10 m: ≥ 300 µε (alert level).
    expect(first.name).toContain("P11");
    expect(["alert", "limit"]).toContain(first.level);
    for (const e of d.elements.slice(0, 3)) {
      const r = await call(seriesGet, { method: "GET", path: `/api/v1/sites/${fx.site.slug}/elements/${e.id}/series`, params: { slug: fx.site.slug, id: String(e.id) }, cookie: viewer, query: { quantity: e.quantity, ...FULL_Q } });
      expect(r.status).toBe(200);
      const pts = r.json.points as { t: string; value: number; sigma: number | null }[];
      const last = pts[pts.length - 1];
      expect(e.end?.value).toBe(last.value);
      expect(e.end?.sigma).toBe(last.sigma);
      expect(new Date(e.end?.timeMs ?? 0).toISOString()).toBe(last.t);
      expect(e.series.value).toEqual(pts.map((p) => p.value));
    }
  });

  it("buildReportData lists the alerts of the period with their events and the acknowledgement comment", async () => {
    const d = await buildReportData(fx.site, FULL, { label: "t" });
    expect(d.alerts.length).toBeGreaterThan(0);
    const acked = d.alerts.find((a) => a.id === fx.acknowledgedAlertId);
    expect(acked?.ackComment).toBe("Seen on site; cracks mapped, no change.");
    expect(acked?.events.map((e) => e.kind)).toContain("open");
    const html = renderReportHtml(d, { marginBoxes: false }).body;
    expect(html).toContain("Seen on site; cracks mapped, no change.");
    expect(html).toContain(`data-alert-id="${fx.acknowledgedAlertId}"`);
  });

  it("buildReportData counts coverage on the 6 h cycle: 30 expected, 30 received, P33 missing twice", async () => {
    const d = await buildReportData(fx.site, FULL, { label: "t" });
    expect(d.coverage.medianIntervalS).toBe(6 * 3600);
    expect(d.coverage.expected).toBe(30);
    expect(d.coverage.received).toBe(30);
    expect(d.coverage.missedByPoint).toEqual([{ code: "P33", observed: 28, missed: 2 }]);
    // Half a cycle more at the end expects no extra epoch; a day more expects four that did not come.
    const longer = await buildReportData(fx.site, { fromMs: FULL.fromMs, toMs: FULL.toMs + 86_400_000 }, { label: "t" });
    expect(longer.coverage.expected).toBe(34);
    expect(longer.coverage.received).toBe(30);
  });
});

describe("GET /api/v1/sites/{slug}/export/{file}", () => {
  it("observations.csv re-imports through the column mapping into a second site with the same coordinates (1e-9 m)", async () => {
    const out = await exportText(fx.site.slug, "observations.csv", viewer);
    expect(out.status).toBe(200);
    expect(out.type).toBe("text/csv; charset=utf-8");
    expect(out.text.split("\r\n")[0]).toBe("time_utc,point,east_m,north_m,height_m,sigma_east_m,sigma_north_m,sigma_height_m");
    const m: ColumnMapping = { hasHeader: true, columns: { point: "point", east: "east_m", north: "north_m", height: "height_m", time: "time_utc", sigmaEast: "sigma_east_m", sigmaNorth: "sigma_north_m", sigmaHeight: "sigma_height_m" }, coordinateUnit: "m", sigmaUnit: "m", timeFormat: "iso" };
    const mapped = applyColumnMapping(out.text, m);
    expect(mapped.errors).toEqual([]);
    const copy = await newSite();
    const r = await raw(postEpochs, { path: `/api/v1/sites/${copy.slug}/epochs`, params: { slug: copy.slug }, cookie: copy.cookie, method: "POST", body: mapped.csv as string, type: "text/csv" });
    expect(r.status).toBe(201);
    const [a, b] = await Promise.all([coordinates(fx.site.id), coordinates(copy.id)]);
    expect(b.size).toBe(a.size);
    expect(a.size).toBe(EPOCHS * 17 - 2);
    for (const [key, p] of a) {
      const q = b.get(key);
      expect(q, key).toBeDefined();
      expect(Math.abs((q?.east ?? NaN) - p.east)).toBeLessThanOrEqual(1e-9);
      expect(Math.abs((q?.north ?? NaN) - p.north)).toBeLessThanOrEqual(1e-9);
      expect(Math.abs((q?.height ?? NaN) - p.height)).toBeLessThanOrEqual(1e-9);
      expect(q?.sigmaEast).toBe(p.sigmaEast);
    }
  });

  it("observations.geojson re-imports into a site with the same origin to 1 mm; without an origin geometries are null", async () => {
    const out = await exportText(fx.site.slug, "observations.geojson", viewer, { from: FULL_Q.from, to: new Date(T0_MS + 2 * CYCLE_MS).toISOString() });
    expect(out.status).toBe(200);
    expect(out.type).toBe("application/geo+json");
    const fc = JSON.parse(out.text) as { features: { geometry: { type: string; coordinates: number[] } | null }[]; epochal: { frame: string } };
    expect(fc.epochal.frame).toBe("wgs84");
    expect(fc.features.length).toBe(3 * 17);
    expect(fc.features[0].geometry?.type).toBe("Point");
    // Longitude first (RFC 7946 §3.1.1): near the origin's 8.54° E, 47.38° N.
    expect(Math.abs((fc.features[0].geometry?.coordinates[0] ?? 0) - ORIGIN.originLonDeg)).toBeLessThan(0.1);
    const copy = await newSite(ORIGIN);
    const r = await raw(postEpochs, { path: `/api/v1/sites/${copy.slug}/epochs`, params: { slug: copy.slug }, cookie: copy.cookie, method: "POST", body: out.text, type: "application/geo+json" });
    expect(r.status).toBe(201);
    const [a, b] = await Promise.all([coordinates(fx.site.id), coordinates(copy.id)]);
    expect(b.size).toBe(3 * 17);
    for (const [key, q] of b) {
      const p = a.get(key);
      expect(p, key).toBeDefined();
      expect(Math.abs(q.east - (p?.east ?? NaN))).toBeLessThan(1e-3);
      expect(Math.abs(q.north - (p?.north ?? NaN))).toBeLessThan(1e-3);
      expect(Math.abs(q.height - (p?.height ?? NaN))).toBeLessThan(1e-3);
    }
    const local = await makeReportSite({ withOrigin: false });
    const cookie = await sessionFor(local.site.id, "viewer");
    const lf = JSON.parse((await exportText(local.site.slug, "observations.geojson", cookie)).text) as { features: { geometry: unknown; properties: Record<string, unknown> }[]; epochal: { frame: string } };
    expect(lf.epochal.frame).toBe("local");
    expect(lf.features.every((f) => f.geometry === null && typeof f.properties.east_m === "number")).toBe(true);
  }, 180_000);

  it("results.csv gives µε with σ for every result row of the period, equal to the stored values", async () => {
    const out = await exportText(fx.site.slug, "results.csv", viewer);
    expect(out.status).toBe(200);
    const { records } = tokenizeCsv(out.text);
    const head = records[0].fields.map((f) => f.value);
    expect(head).toContain("green_max_microstrain");
    expect(head).toContain("sigma_green_max_microstrain");
    const rows = records.slice(1).map((r) => Object.fromEntries(head.map((h, i) => [h, r.fields[i]?.value ?? ""])));
    const enabled = await getDb().element.findMany({ where: { siteId: fx.site.id, disabledAt: null }, select: { id: true } });
    const stored = await getDb().elementResult.count({ where: { elementId: { in: enabled.map((x) => x.id) } } });
    expect(rows.length).toBe(stored);
    const e = await getDb().element.findUniqueOrThrow({ where: { id: fx.triangleIds[0] } });
    const last = await getDb().elementResult.findFirstOrThrow({ where: { elementId: e.id }, orderBy: { time: "desc" } });
    const row = rows.find((r) => r.element === e.name && r.time_utc === last.time.toISOString());
    expect(Number(row?.green_max_microstrain)).toBeCloseTo((last.greenMax ?? NaN) * 1e6, 9);
    expect(Number(row?.sigma_green_max_microstrain)).toBeCloseTo((last.sigmaGreenMax ?? NaN) * 1e6, 9);
  });

  it("elements.geojson has polygons for triangles and a LineString for the baseline", async () => {
    const out = await exportText(fx.site.slug, "elements.geojson", viewer);
    const fc = JSON.parse(out.text) as { features: { id: number; geometry: { type: string; coordinates: unknown[] } | null; properties: Record<string, unknown> }[] };
    const byId = new Map(fc.features.map((f) => [f.id, f]));
    expect(byId.get(fx.triangleIds[0])?.geometry?.type).toBe("Polygon");
    expect(byId.get(fx.baselineId)?.geometry?.type).toBe("LineString");
    expect(typeof byId.get(fx.triangleIds[0])?.properties.green_max_microstrain).toBe("number");
  });

  it("answers 404 for an unknown export, 422 for a bad period and 401 without a session", async () => {
    expect((await exportText(fx.site.slug, "points.xlsx", viewer)).status).toBe(404);
    expect((await exportText(fx.site.slug, "results.csv", viewer, { from: "2026-03-05", to: "2026-03-01" })).status).toBe(422);
    expect((await exportText(fx.site.slug, "results.csv", viewer, { from: "yesterday", to: "2026-03-01" })).status).toBe(422);
    expect((await exportText(fx.site.slug, "results.csv", "")).status).toBe(401);
  });

  it("takes dates as whole days in the site's zone: from=2026-03-01&to=2026-03-01 is that Zurich day", async () => {
    const out = await exportText(fx.site.slug, "observations.csv", viewer, { from: "2026-03-01", to: "2026-03-01" });
    const times = new Set(out.text.split("\r\n").slice(1).filter(Boolean).map((l) => l.split(",")[0]));
    // Zurich is UTC+01:00 in March before the 29th: the day is 2026-02-28T23:00Z … 2026-03-01T23:00Z.
    expect([...times]).toEqual(["2026-03-01T00:00:00.000Z", "2026-03-01T06:00:00.000Z", "2026-03-01T12:00:00.000Z", "2026-03-01T18:00:00.000Z"]);
  });
});

describe("GET/PUT /api/v1/sites/{slug}/column-mapping", () => {
  const mapping: ColumnMapping = { hasHeader: true, columns: { point: "Name", east: "X_mm", north: "Y_mm", height: "Z_mm", time: "Stamp" }, coordinateUnit: "mm", sigmaUnit: "mm", timeFormat: "pattern", timePattern: "dd.MM.yyyy HH:mm", timeZone: "Europe/Zurich" };
  const path = () => `/api/v1/sites/${fx.site.slug}/column-mapping`;

  it("PUT stores the mapping with an audit row and GET returns it", async () => {
    const before = await getDb().auditEntry.count({ where: { siteId: fx.site.id, action: "site.column-mapping" } });
    const put = await call(mappingRoute.PUT, { method: "PUT", path: path(), params: { slug: fx.site.slug }, cookie: surveyor, body: mapping });
    expect(put.status).toBe(200);
    const got = await call(mappingRoute.GET, { method: "GET", path: path(), params: { slug: fx.site.slug }, cookie: viewer });
    expect(got.json.mapping).toEqual(mapping);
    expect(await getDb().auditEntry.count({ where: { siteId: fx.site.id, action: "site.column-mapping" } })).toBe(before + 1);
  });

  it("PUT refuses a viewer (403) and a mapping with a pattern format but no pattern, naming the field (422)", async () => {
    expect((await call(mappingRoute.PUT, { method: "PUT", path: path(), params: { slug: fx.site.slug }, cookie: viewer, body: mapping })).status).toBe(403);
    const bad = await call(mappingRoute.PUT, { method: "PUT", path: path(), params: { slug: fx.site.slug }, cookie: surveyor, body: { ...mapping, timePattern: null } });
    expect(bad.status).toBe(422);
    expect((bad.json.errors as { field: string }[]).map((e) => e.field)).toContain("timePattern");
    const unknown = await call(mappingRoute.PUT, { method: "PUT", path: path(), params: { slug: fx.site.slug }, cookie: surveyor, body: { ...mapping, columns: { ...mapping.columns, colour: "C" } } });
    expect(unknown.status).toBe(422);
  });
});

describe("GET /api/v1/sites/{slug}/report.pdf", () => {
  const hasChromium = spawnSync("test", ["-x", process.env.EPOCHAL_CHROMIUM || "/usr/bin/chromium"]).status === 0;
  const hasPoppler = spawnSync("pdftoppm", ["-v"]).error === undefined;

  it.skipIf(!hasChromium || !hasPoppler)("renders an A4 PDF whose page tree /Count equals the PNG pages pdftoppm makes, with a non-blank first page", async () => {
    const r = await raw(pdfGet, { path: `/api/v1/sites/${fx.site.slug}/report.pdf`, params: { slug: fx.site.slug }, cookie: viewer, query: FULL_Q });
    expect(r.status).toBe(200);
    expect(r.headers.get("content-type")).toBe("application/pdf");
    const pdf = Buffer.from(await r.arrayBuffer());
    expect(pdf.subarray(0, 5).toString()).toBe("%PDF-");
    const dir = mkdtempSync(join(tmpdir(), "epochal-report-"));
    writeFileSync(join(dir, "report.pdf"), pdf);
    // The root page tree's /Count (PDF 32000-1 §7.7.3.2): the largest /Count of the /Type /Pages nodes.
    const counts = [...pdf.toString("latin1").matchAll(/\/Type\s*\/Pages[^>]*?\/Count\s+(\d+)|\/Count\s+(\d+)[^>]*?\/Type\s*\/Pages/g)].map((m) => Number(m[1] ?? m[2]));
    const pageCount = Math.max(...counts);
    execFileSync("pdftoppm", ["-png", "-r", "50", join(dir, "report.pdf"), join(dir, "page")]);
    const pngs = readdirSync(dir).filter((f) => f.endsWith(".png"));
    expect(pageCount).toBeGreaterThanOrEqual(2);
    expect(pngs.length).toBe(pageCount);
    // A4 (210 × 297 mm = 8.27 × 11.69 in) at 50 dpi ≈ 413 × 585 px (PNG IHDR width and height);
    // ±2 px for Chromium's rounding of the paper size to 1/100 in and pdftoppm's rounding up.
    const first = readFileSync(join(dir, pngs.sort()[0]));
    expect(Math.abs(first.readUInt32BE(16) - 413)).toBeLessThanOrEqual(2);
    expect(Math.abs(first.readUInt32BE(20) - 585)).toBeLessThanOrEqual(2);
    execFileSync("pdftoppm", ["-gray", "-r", "30", "-f", "1", "-l", "1", join(dir, "report.pdf"), join(dir, "first")]);
    const pgm = readFileSync(join(dir, readdirSync(dir).find((f) => f.startsWith("first") && f.endsWith(".pgm")) as string));
    // Binary PGM (P5): header "P5\n<w> <h>\n255\n", then one byte per pixel.
    const headerEnd = pgm.indexOf("\n255\n") + 5;
    const pixels = pgm.subarray(headerEnd);
    const dark = pixels.reduce((n, v) => n + (v < 200 ? 1 : 0), 0);
    expect(dark / pixels.length).toBeGreaterThan(0.01);
    console.log(`report PDF: ${pageCount} pages, ${pdf.length} bytes, PNG pages in ${dir}`);
  }, 120_000);

  it("answers 503 with a message when Chromium is absent", async () => {
    const saved = process.env.EPOCHAL_CHROMIUM;
    process.env.EPOCHAL_CHROMIUM = "/nonexistent/chromium";
    try {
      const r = await raw(pdfGet, { path: `/api/v1/sites/${fx.site.slug}/report.pdf`, params: { slug: fx.site.slug }, cookie: viewer, query: FULL_Q });
      expect(r.status).toBe(503);
      const j = (await r.json()) as { error: { message: string } };
      expect(j.error.message).toMatch(/Chromium/);
    } finally {
      if (saved === undefined) delete process.env.EPOCHAL_CHROMIUM;
      else process.env.EPOCHAL_CHROMIUM = saved;
    }
  });

  it("refuses a report period longer than the limit (422) and answers 401 without a session", async () => {
    const long = await raw(pdfGet, { path: "/x", params: { slug: fx.site.slug }, cookie: viewer, query: { from: "2024-01-01", to: "2026-03-01" } });
    expect(long.status).toBe(422);
    const anon = await raw(pdfGet, { path: "/x", params: { slug: fx.site.slug }, cookie: `${SESSION_COOKIE}=nope` });
    expect(anon.status).toBe(401);
  });
});
