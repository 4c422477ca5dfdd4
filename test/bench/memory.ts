/**
 * Server memory benchmark: peak resident set (VmHWM in /proc/<pid>/status, summed over the `next start`
 * process and its children) of the production server with the large synthetic site of page.ts loaded
 * (default 500 points, 1,460 epochs, ≈ 950 triangles, ≈ 1.4 M ElementResult rows) and exercised:
 * the site page opened in headless Chromium several times (plan, charts and every request the page
 * makes), every element's series read through the API, and live epochs of all points posted through
 * the HTTP ingest route (results computed for every element). Not a timed test: it prints figures.
 *
 *   EPOCHAL_DIST_DIR=.next-bench node --import tsx test/bench/memory.ts [--json] [--no-build]
 *       [--points 500] [--epochs 1460] [--posts 10] [--page-loads 3]
 *
 * Needs DATABASE_URL's server (a fresh database is made and dropped) or the embedded default.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { existsSync, readFileSync, readdirSync } from "node:fs";
import { createServer } from "node:net";
import { loadavg } from "node:os";
import pg from "pg";
import { chromium } from "playwright-core";
import { createTestDatabase } from "../support/database.ts";
import { ensureBuild, serverNodeOptions } from "../../lib/server/cli/serve-core.ts";
import { hashSecret, newSecret } from "../../lib/server/auth/secrets.ts";
import { buildSyntheticSite } from "./synthetic-site.ts";

const argv = process.argv.slice(2);
const opt = (name: string, dflt: number): number => {
  const i = argv.indexOf(name);
  return i >= 0 ? Number(argv[i + 1]) : dflt;
};
const json = argv.includes("--json");
const build = !argv.includes("--no-build");
const POINTS = opt("--points", 500);
const EPOCHS = opt("--epochs", 1460);
const POSTS = opt("--posts", 10);
const PAGE_LOADS = opt("--page-loads", 3);
const say = (m: string): void => {
  if (json) console.error(m);
  else console.log(m);
};

/** kB from a `Key:   123 kB` line of /proc/<pid>/status, or 0 when the process is gone. */
function statusKb(pid: number, key: string): number {
  try {
    const m = new RegExp(`^${key}:\\s+(\\d+) kB`, "m").exec(readFileSync(`/proc/${pid}/status`, "utf8"));
    return m ? Number(m[1]) : 0;
  } catch {
    return 0;
  }
}

/** The process and all its descendants (from /proc/<pid>/task/<pid>/children, else a scan of PPid). */
function processTree(root: number): number[] {
  const out = [root];
  const all = readdirSync("/proc").filter((d) => /^\d+$/.test(d)).map(Number);
  const parentOf = new Map<number, number>();
  for (const p of all) {
    const m = /^PPid:\s+(\d+)/m.exec((() => { try { return readFileSync(`/proc/${p}/status`, "utf8"); } catch { return ""; } })());
    if (m) parentOf.set(p, Number(m[1]));
  }
  for (let i = 0; i < out.length; i++) for (const [p, pp] of parentOf) if (pp === out[i] && !out.includes(p)) out.push(p);
  return out;
}

function freePort(): Promise<number> {
  return new Promise((ok) => {
    const s = createServer();
    s.listen(0, "127.0.0.1", () => {
      const a = s.address();
      s.close(() => ok(typeof a === "object" && a ? a.port : 0));
    });
  });
}

async function main(): Promise<void> {
  if (build) ensureBuild();
  const db = await createTestDatabase("bench_memory");
  let server: ChildProcess | null = null;
  try {
    const site = await buildSyntheticSite(db.url, { points: POINTS, epochs: EPOCHS, log: say });
    const c = new pg.Client({ connectionString: db.url });
    await c.connect();
    const secret = newSecret("ept");
    await c.query(`INSERT INTO "ApiToken"("siteId", scope, "tokenHash", prefix) VALUES ($1, 'ingest', $2, $3)`, [site.siteId, hashSecret(secret), secret.slice(0, 10)]);
    const lastObs = await c.query<{ code: string; east: number; north: number; height: number }>(
      `SELECT p.code, o.east, o.north, o.height FROM "Observation" o JOIN "Point" p ON p.id = o."pointId"
        WHERE o."epochId" = (SELECT id FROM "Epoch" WHERE "siteId" = $1 ORDER BY time DESC LIMIT 1)`,
      [site.siteId],
    );
    const [{ last }] = (await c.query<{ last: Date }>(`SELECT max(time) AS last FROM "Epoch" WHERE "siteId" = $1`, [site.siteId])).rows;
    const elementIds = (await c.query<{ id: number }>(`SELECT id FROM "Element" WHERE "siteId" = $1 ORDER BY id`, [site.siteId])).rows.map((r) => r.id);
    await c.end();

    const port = await freePort();
    const baseUrl = `http://127.0.0.1:${port}`;
    server = spawn(process.execPath, ["node_modules/next/dist/bin/next", "start", "-p", String(port), "-H", "127.0.0.1"], {
      env: { ...process.env, DATABASE_URL: db.url, NEXT_TELEMETRY_DISABLED: "1", NODE_OPTIONS: serverNodeOptions() },
      stdio: ["ignore", "ignore", "inherit"],
    });
    for (let i = 0; ; i++) {
      if (await fetch(`${baseUrl}/api/health`).then((r) => r.ok, () => false)) break;
      if (i > 300 || server.exitCode !== null) throw new Error("next start did not come up");
      await new Promise((r) => setTimeout(r, 200));
    }
    const pid = server.pid as number;
    const rssAfterStartKb = processTree(pid).reduce((s, p) => s + statusKb(p, "VmRSS"), 0);

    // 1. The site page in Chromium, a few times (each a fresh context: no browser cache).
    const executablePath = process.env.EPOCHAL_CHROMIUM ?? "/usr/bin/chromium";
    if (existsSync(executablePath)) {
      const browser = await chromium.launch({ executablePath, args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"] });
      try {
        for (let i = 0; i < PAGE_LOADS; i++) {
          const ctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
          await ctx.addCookies([{ name: "epochal_session", value: site.cookie, url: baseUrl }]);
          const page = await ctx.newPage();
          await page.goto(`${baseUrl}/sites/${site.slug}`, { waitUntil: "networkidle", timeout: 120_000 });
          await ctx.close();
        }
      } finally {
        await browser.close();
      }
    } else say(`no Chromium at ${executablePath}: page loads skipped`);
    // 2. Every element's series (a year each), four at a time.
    const headers = { cookie: `epochal_session=${site.cookie}` };
    let seriesOk = 0;
    for (let i = 0; i < elementIds.length; i += 4) {
      const st = await Promise.all(elementIds.slice(i, i + 4).map((id) => fetch(`${baseUrl}/api/v1/sites/${site.slug}/elements/${id}/series?quantity=greenMax`, { headers }).then(async (r) => (await r.arrayBuffer(), r.status))));
      seriesOk += st.filter((s) => s === 200).length;
    }
    // 3. Live epochs of every point through the HTTP ingest route.
    let posted = 0;
    const stepMs = Math.max(60_000, Math.floor((Date.now() - 60_000 - last.getTime()) / (POSTS + 1)));
    for (let k = 1; k <= POSTS; k++) {
      const t = new Date(last.getTime() + k * stepMs).toISOString();
      const body = ["point,east,north,height,time", ...lastObs.rows.map((o) => `${o.code},${(o.east + 1e-4 * k).toFixed(5)},${o.north.toFixed(5)},${o.height.toFixed(5)},${t}`)].join("\n") + "\n";
      const r = await fetch(`${baseUrl}/api/v1/sites/${site.slug}/epochs`, { method: "POST", headers: { "content-type": "text/csv", authorization: `Bearer ${secret}` }, body });
      await r.arrayBuffer();
      if (r.status === 201) posted++;
      else say(`post ${k} answered ${r.status}`);
    }
    const tree = processTree(pid);
    const peakKb = tree.reduce((s, p) => s + statusKb(p, "VmHWM"), 0);
    const rssKb = tree.reduce((s, p) => s + statusKb(p, "VmRSS"), 0);
    const result = {
      peakRssMb: Number((peakKb / 1024).toFixed(1)),
      notes: {
        peakRssMb: `VmHWM of next start (${tree.length} process${tree.length > 1 ? "es" : ""}) after ${PAGE_LOADS} page loads in Chromium, ${seriesOk}/${elementIds.length} element series and ${posted}/${POSTS} live epochs of ${lastObs.rows.length} points; site ${site.points} points, ${site.epochs} epochs, ${site.elements} elements, ${site.results.toLocaleString("en-GB")} results; RSS after start ${(rssAfterStartKb / 1024).toFixed(0)} MB, at the end ${(rssKb / 1024).toFixed(0)} MB; server heap cap ${process.env.EPOCHAL_SERVER_HEAP_MB ? `EPOCHAL_SERVER_HEAP_MB=${process.env.EPOCHAL_SERVER_HEAP_MB}` : "none (V8 default)"}; load ${loadavg()[0].toFixed(1)}; goal ≤ 300 MB`,
      },
    };
    if (json) console.log(JSON.stringify(result));
    else console.log(`server peak RSS: ${result.peakRssMb} MB (goal ≤ 300 MB)\n  ${result.notes.peakRssMb}`);
  } finally {
    server?.kill("SIGTERM");
    await new Promise((r) => setTimeout(r, 500));
    await db.drop();
  }
}

main().then(
  () => process.exit(0),
  (err) => {
    console.error(err);
    process.exit(1);
  },
);
