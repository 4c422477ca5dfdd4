/**
 * Site page benchmark: time until the site plan is drawn and no request is pending, in headless
 * Chromium (median of --runs after one warm-up; `planDrawnMs` is the plan alone, before the last
 * request such as the router's link prefetches has finished), for a synthetic site (default 500 points, one year of epochs every 6 h = 1 460 epochs,
 * ≈ 950 Delaunay triangles, ≈ 1.4 million ElementResult rows), against `next start` on the
 * production build (EPOCHAL_DIST_DIR) and its own fresh database. Not a timed test: it prints figures.
 *
 *   DATABASE_URL=postgresql://postgres@127.0.0.1:5432/postgres EPOCHAL_DIST_DIR=.next-bench \
 *     node --import tsx test/bench/page.ts [--json] [--points 500] [--epochs 1460] [--runs 5]
 *
 * Options: --keep leaves the database and server running (prints the URL and a session cookie) for
 * looking at the screens by hand; --no-build uses the existing build as it is.
 *
 * Besides the wall-clock figures (noisy on a shared machine) it prints, as medians, the CPU time of
 * the `next start` process per page load (`serverCpuMs`, from /proc, Linux only; it includes the
 * static files and the live-event stream) and the page's renderer main-thread time until ready
 * (`pageTaskMs`, of which `pageScriptMs` is JavaScript; Chromium's Performance metrics).
 *
 * Chromium builds its own omnibox popup (a WebUI page in a renderer of its own) for every new
 * browser window, that is for every fresh context here, at the same time as the page loads; on two
 * cores that took some 600-800 ms from the page. A user's browser builds it once per window, not per
 * page load, so the benchmark turns those two features off (BROWSER_FEATURES_OFF).
 *
 * Data: the synthetic site of test/bench/synthetic-site.ts.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";
import { existsSync, readFileSync } from "node:fs";
import { chromium } from "playwright-core";
import { createTestDatabase } from "../support/database.ts";
import { ensureBuild } from "../../lib/server/cli/serve-core.ts";
import { buildSyntheticSite } from "./synthetic-site.ts";

/**
 * Features Chromium turns off for this run. Chromium keeps only the last --disable-features, so
 * Playwright's own list (playwright-core 1.65, chromiumSwitches) is repeated here, then ours: the
 * omnibox popup's WebUI pages, which a new window otherwise builds while the page loads.
 */
const BROWSER_FEATURES_OFF = [
  "AvoidUnnecessaryBeforeUnloadCheckSync", "DestroyProfileOnBrowserClose", "HttpsUpgrades", "HttpsFirstBalancedModeAutoEnable", "LensOverlay", "MediaRouter",
  "PaintHolding", "ThirdPartyStoragePartitioning", "AvoidCorsURLLoaderRestartOnRedirect", "TcpPortRandomizationWin", "OptimizationHints", "NetworkTimeServiceQuerying",
  "AimEnabled", "PreconnectToSearch", "msForceBrowserSignIn", "msEdgeUpdateLaunchServicesPreferredVersion",
  "WebUIOmniboxPopup", "WebUIOmniboxAimPopup",
];

/** CPU time (user + system) of a process in ms from /proc (clock ticks of 10 ms, the Linux default); null elsewhere. */
function processCpuMs(pid: number | undefined): number | null {
  if (!pid) return null;
  try {
    const f = readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
    return (Number(f[11]) + Number(f[12])) * 10;
  } catch {
    return null;
  }
}

const medianOf = (v: number[]): number | null => (v.length ? [...v].sort((a, b) => a - b)[Math.floor(v.length / 2)] : null);

type Args = { json: boolean; points: number; epochs: number; runs: number; keep: boolean; build: boolean };

function parseArgs(argv: string[]): Args {
  const a: Args = { json: false, points: 500, epochs: 1460, runs: 5, keep: false, build: true };
  for (let i = 0; i < argv.length; i++) {
    const k = argv[i];
    if (k === "--json") a.json = true;
    else if (k === "--keep") a.keep = true;
    else if (k === "--no-build") a.build = false;
    else if (k === "--points") a.points = Number(argv[++i]);
    else if (k === "--epochs") a.epochs = Number(argv[++i]);
    else if (k === "--runs") a.runs = Number(argv[++i]);
    else throw new Error(`unknown option ${k}`);
  }
  return a;
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
  const args = parseArgs(process.argv.slice(2));
  const say = (m: string) => {
    if (!args.json) console.log(m);
    else console.error(m);
  };
  if (args.build) ensureBuild();
  const db = await createTestDatabase("bench");
  let server: ChildProcess | null = null;
  try {
    const t0 = Date.now();
    const site = await buildSyntheticSite(db.url, { points: args.points, epochs: args.epochs, log: say });
    say(`data ready in ${((Date.now() - t0) / 1000).toFixed(1)} s`);
    const port = await freePort();
    const baseUrl = `http://127.0.0.1:${port}`;
    server = spawn(process.execPath, ["node_modules/next/dist/bin/next", "start", "-p", String(port), "-H", "127.0.0.1"], {
      env: { ...process.env, DATABASE_URL: db.url, NEXT_TELEMETRY_DISABLED: "1" },
      stdio: ["ignore", "ignore", "inherit"],
    });
    for (let i = 0; ; i++) {
      try {
        if ((await fetch(`${baseUrl}/api/health`)).ok) break;
      } catch {
        /* starting */
      }
      if (i > 300) throw new Error("next start did not come up");
      await new Promise((r) => setTimeout(r, 200));
    }
    if (args.keep) {
      const stop = () => {
        server?.kill("SIGTERM");
        void db.drop().finally(() => process.exit(0));
      };
      process.on("SIGTERM", stop);
      process.on("SIGINT", stop);
      console.log(JSON.stringify({ baseUrl, databaseUrl: db.url, cookie: `epochal_session=${site.cookie}`, email: site.email, password: site.password, slug: site.slug, serverPid: server.pid }));
      await new Promise(() => undefined);
    }
    const executablePath = process.env.EPOCHAL_CHROMIUM ?? "/usr/bin/chromium";
    if (!existsSync(executablePath)) throw new Error(`no Chromium at ${executablePath}`);
    const browser = await chromium.launch({
      executablePath,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync", `--disable-features=${BROWSER_FEATURES_OFF.join(",")}`],
    });
    const samples: number[] = [];
    const drawnSamples: number[] = [];
    const cpu = { server: [] as number[], task: [] as number[], script: [] as number[] };
    try {
      for (let run = 0; run < args.runs + 1; run++) {
        const ctx = await browser.newContext({ viewport: { width: 1280, height: 800 } });
        await ctx.addCookies([{ name: "epochal_session", value: site.cookie, url: baseUrl }]);
        const page = await ctx.newPage();
        let inflight = 0;
        let lastDone = 0;
        // Long-lived streams (server-sent events for live refresh) never finish: they are not "pending work".
        const counted = (r: { resourceType(): string; url(): string }) => r.resourceType() !== "eventsource" && !r.url().includes("/events");
        page.on("request", (r) => {
          if (counted(r)) inflight += 1;
        });
        const done = (r: { resourceType(): string; url(): string }) => {
          if (!counted(r)) return;
          inflight -= 1;
          lastDone = Date.now();
        };
        page.on("requestfinished", done);
        page.on("requestfailed", done);
        const cdp = await ctx.newCDPSession(page);
        await cdp.send("Performance.enable");
        const cpu0 = processCpuMs(server.pid);
        const start = Date.now();
        await page.goto(`${baseUrl}/sites/${site.slug}`, { waitUntil: "commit" });
        await page.waitForSelector('section.plan[data-ready="true"] svg .elements polygon', { timeout: 60_000 });
        const drawn = Date.now();
        const idleBy = Date.now() + 30_000;
        while (inflight > 0 && Date.now() < idleBy) await new Promise((r) => setTimeout(r, 5));
        if (inflight > 0) throw new Error(`requests still pending 30 s after the plan was drawn (${inflight})`);
        const ms = Math.max(drawn, lastDone) - start;
        const cpu1 = processCpuMs(server.pid);
        const m = Object.fromEntries((await cdp.send("Performance.getMetrics")).metrics.map((x) => [x.name, x.value]));
        const serverMs = cpu0 !== null && cpu1 !== null ? cpu1 - cpu0 : null;
        if (run > 0) {
          samples.push(ms);
          drawnSamples.push(drawn - start);
          if (serverMs !== null) cpu.server.push(serverMs);
          cpu.task.push(Math.round(m.TaskDuration * 1000));
          cpu.script.push(Math.round(m.ScriptDuration * 1000));
        }
        say(`run ${run}${run === 0 ? " (warm-up)" : ""}: ${ms} ms (plan drawn at ${drawn - start} ms; server CPU ${serverMs ?? "–"} ms, page main thread ${Math.round(m.TaskDuration * 1000)} ms of which script ${Math.round(m.ScriptDuration * 1000)} ms)`);
        await ctx.close();
      }
    } finally {
      await browser.close();
    }
    samples.sort((a, b) => a - b);
    const median = samples[Math.floor(samples.length / 2)];
    drawnSamples.sort((a, b) => a - b);
    const result = {
      sitePageReadyMs: median,
      planDrawnMs: drawnSamples[Math.floor(drawnSamples.length / 2)],
      samplesMs: samples,
      serverCpuMs: medianOf(cpu.server),
      pageTaskMs: medianOf(cpu.task),
      pageScriptMs: medianOf(cpu.script),
      points: site.points,
      epochs: site.epochs,
      elements: site.elements,
      elementResults: site.results,
    };
    if (args.json) console.log(JSON.stringify(result));
    else {
      console.log(`site page ready (median of ${samples.length}): ${median} ms  [${samples.join(", ")}]`);
      console.log(`CPU per load (medians): server ${result.serverCpuMs ?? "–"} ms, page main thread ${result.pageTaskMs} ms of which script ${result.pageScriptMs} ms`);
    }
  } finally {
    server?.kill("SIGTERM");
    await new Promise((r) => setTimeout(r, 300));
    await db.drop();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main().catch((err) => {
    console.error(err);
    process.exit(1);
  });
}
