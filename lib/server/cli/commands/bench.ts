/**
 * `epochal bench`: runs every benchmark script under test/bench/ (each prints one JSON object as
 * its last line when given --json), then prints one table, or one JSON object with --json.
 * Benchmarks are measurements, never pass/fail tests; a goal missed is reported, not hidden.
 *
 * Database: DATABASE_URL's server when set (each script makes and drops a database of its own),
 * else one embedded PostgreSQL started here for the whole run. Server: the scripts that need
 * `next start` share one production build in EPOCHAL_DIST_DIR (default .next-bench), built here once
 * when stale. Each figure is the median of the script's own runs; the 1-minute load average before
 * and after each script is printed beside it (the machine may be shared).
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { cpus, loadavg, release, tmpdir, totalmem } from "node:os";
import { join } from "node:path";

export const help = `Usage: epochal bench [--json] [--only NAME[,NAME]] [--quick] [--repeat N]

Runs the benchmarks in test/bench/ against DATABASE_URL's PostgreSQL server (each makes a
database of its own; without DATABASE_URL one embedded PostgreSQL is started for the run) and
prints one table with the goals and the machine's load beside the figures.
  --json     print one JSON object: kernelTriangleEpochsPerS, kernelRatioToNumpy,
             backfillObservationsPerS, backfillRatioToCopy, liveEpochP50Ms, liveEpochP95Ms,
             seriesYearMs, sitePageReadyMs, peakRssMb, notes
  --only     run some of: kernel, ingest, series, page, memory
  --quick    smaller data (for a smoke run; figures are then not comparable with the goals)
  --repeat   run each script N times and report the median of each figure (default 1; every
             script already reports the median of several runs of its own)`;

type Figures = {
  kernelTriangleEpochsPerS: number | null;
  kernelRatioToNumpy: number | null;
  backfillObservationsPerS: number | null;
  backfillRatioToCopy: number | null;
  liveEpochP50Ms: number | null;
  liveEpochP95Ms: number | null;
  seriesYearMs: number | null;
  sitePageReadyMs: number | null;
  peakRssMb: number | null;
  notes: Record<string, string>;
};

type Script = { name: string; file: string; keys: readonly (keyof Omit<Figures, "notes">)[]; server: boolean };

const SCRIPTS: readonly Script[] = [
  { name: "kernel", file: "kernel.ts", keys: ["kernelTriangleEpochsPerS", "kernelRatioToNumpy"], server: false },
  { name: "ingest", file: "ingest.ts", keys: ["backfillObservationsPerS", "backfillRatioToCopy", "liveEpochP50Ms", "liveEpochP95Ms"], server: true },
  { name: "series", file: "series.ts", keys: ["seriesYearMs"], server: false },
  { name: "page", file: "page.ts", keys: ["sitePageReadyMs"], server: true },
  { name: "memory", file: "memory.ts", keys: ["peakRssMb"], server: true },
];

const GOALS: Record<string, string> = {
  kernelRatioToNumpy: "≥ 4",
  backfillRatioToCopy: "≥ 0.5",
  liveEpochP95Ms: "≤ 150",
  seriesYearMs: "≤ 50",
  sitePageReadyMs: "≤ 1500",
  peakRssMb: "≤ 300",
};

function lastJson(text: string): Record<string, unknown> | null {
  const lines = text.trim().split("\n").reverse();
  for (const l of lines) {
    const t = l.trim();
    if (t.startsWith("{") && t.endsWith("}")) {
      try {
        return JSON.parse(t) as Record<string, unknown>;
      } catch {
        /* keep looking */
      }
    }
  }
  return null;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** One line about the machine: CPUs, memory, kernel, Node, PostgreSQL and numpy versions. */
function describeMachine(databaseUrl: string): string {
  const pgv = spawnSync("psql", [databaseUrl, "-Atc", "SHOW server_version"], { encoding: "utf8" });
  const np = spawnSync("python3", ["-c", "import numpy; print(numpy.__version__)"], { encoding: "utf8" });
  return `${cpus().length} × ${cpus()[0]?.model ?? "cpu"}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, Linux ${release()}, Node ${process.version}, PostgreSQL ${pgv.status === 0 ? pgv.stdout.trim() : "?"}, numpy ${np.status === 0 ? np.stdout.trim() : "absent"}`;
}

export async function run(args: string[]): Promise<number> {
  const json = args.includes("--json");
  const quick = args.includes("--quick");
  const onlyIdx = args.indexOf("--only");
  const only = onlyIdx >= 0 ? new Set(String(args[onlyIdx + 1] ?? "").split(",")) : null;
  const repIdx = args.indexOf("--repeat");
  const repeat = repIdx >= 0 ? Math.max(1, Math.floor(Number(args[repIdx + 1]) || 1)) : 1;
  const say = (m: string): void => {
    if (!json) console.error(m);
  };
  const fig: Figures = {
    kernelTriangleEpochsPerS: null,
    kernelRatioToNumpy: null,
    backfillObservationsPerS: null,
    backfillRatioToCopy: null,
    liveEpochP50Ms: null,
    liveEpochP95Ms: null,
    seriesYearMs: null,
    sitePageReadyMs: null,
    peakRssMb: null,
    notes: {},
  };
  const selected = SCRIPTS.filter((s) => !only || only.has(s.name));
  const load: Record<string, string> = {};

  // One database server for the run.
  let detach: (() => Promise<void>) | null = null;
  let dataDir: string | null = null;
  if (!process.env.DATABASE_URL) {
    const { attachEmbeddedDatabase } = await import("../../db/embedded.ts");
    dataDir = mkdtempSync(join(tmpdir(), "epochal-bench-pg-"));
    const h = await attachEmbeddedDatabase({ dataDir, log: say });
    detach = h.detach;
    const u = new URL(h.url);
    u.pathname = "/postgres";
    process.env.DATABASE_URL = u.toString();
    fig.notes.database = "embedded PostgreSQL started for this run (DATABASE_URL was not set)";
  } else fig.notes.database = "DATABASE_URL's server";
  process.env.EPOCHAL_DIST_DIR ??= ".next-bench";
  try {
    // One production build for every script that runs `next start`.
    let built = true;
    if (selected.some((s) => s.server)) {
      try {
        const { ensureBuild } = await import("../serve-core.ts");
        say(`building the production server into ${process.env.EPOCHAL_DIST_DIR} when stale …`);
        ensureBuild();
      } catch (err) {
        built = false;
        fig.notes.build = `next build failed (${(err as Error).message}): the live epoch falls back to in-process; page and memory are not measured`;
      }
    }
    for (const s of selected) {
      const file = join("test", "bench", s.file);
      if (!existsSync(file)) {
        for (const k of s.keys) fig.notes[k] = `benchmark ${file} is missing`;
        continue;
      }
      const values = new Map<string, number[]>();
      const loads: number[] = [loadavg()[0]];
      for (let r = 0; r < repeat; r++) {
        say(`running ${file}${repeat > 1 ? ` (${r + 1}/${repeat})` : ""} …`);
        const extra = [...(quick ? ["--quick"] : []), ...(s.server ? ["--no-build"] : []), ...(s.name === "ingest" && !built ? ["--mode", "in-process"] : [])];
        const res = spawnSync(process.execPath, ["--import", "tsx", file, "--json", ...extra], {
          encoding: "utf8",
          maxBuffer: 64 * 1024 * 1024,
          stdio: ["ignore", "pipe", json ? "pipe" : "inherit"],
          env: process.env,
        });
        loads.push(loadavg()[0]);
        const out = lastJson(res.stdout ?? "");
        if (res.status !== 0 || !out) {
          for (const k of s.keys) fig.notes[k] ??= `${s.name} benchmark failed (exit ${res.status}): ${(res.stderr ?? "").trim().split("\n").slice(-2).join(" ")}`;
          continue;
        }
        for (const k of s.keys) {
          const v = out[k];
          if (typeof v === "number" && Number.isFinite(v)) values.set(k, [...(values.get(k) ?? []), v]);
          else fig.notes[k] ??= String((out.notes as Record<string, string> | undefined)?.[k] ?? "not measured");
        }
        const n = out.notes as Record<string, string> | undefined;
        if (n) for (const [k, v] of Object.entries(n)) fig.notes[k] ??= v;
      }
      for (const k of s.keys) {
        const vs = values.get(k);
        if (vs && vs.length > 0) {
          fig[k] = median(vs);
          delete fig.notes[k];
          if (vs.length > 1) fig.notes[`${k}Runs`] = vs.map((v) => String(Number(v.toPrecision(4)))).join(", ");
        }
      }
      load[s.name] = `${Math.min(...loads).toFixed(1)}–${Math.max(...loads).toFixed(1)}`;
      fig.notes[`load.${s.name}`] = `1-minute load average ${load[s.name]} while ${s.name} ran (${cpus().length} cores)`;
    }
    fig.notes.machine = describeMachine(process.env.DATABASE_URL);
    if (quick) fig.notes.quick = "run with --quick: reduced data sizes";
  } finally {
    if (detach) await detach();
    if (dataDir) rmSync(dataDir, { recursive: true, force: true });
  }
  if (json) {
    console.log(JSON.stringify(fig));
    return 0;
  }
  const rows: [string, string, string, string][] = [
    ["strain kernel (triangle-epochs/s)", fmt(fig.kernelTriangleEpochsPerS), "", load.kernel ?? ""],
    ["kernel ÷ numpy (same data, same run)", fmt(fig.kernelRatioToNumpy), GOALS.kernelRatioToNumpy, load.kernel ?? ""],
    ["backfill (observations/s)", fmt(fig.backfillObservationsPerS), "", load.ingest ?? ""],
    ["backfill ÷ COPY (same table)", fmt(fig.backfillRatioToCopy), GOALS.backfillRatioToCopy, load.ingest ?? ""],
    ["live epoch 2,000 pts p50 (ms)", fmt(fig.liveEpochP50Ms), "", load.ingest ?? ""],
    ["live epoch 2,000 pts p95 (ms)", fmt(fig.liveEpochP95Ms), GOALS.liveEpochP95Ms, load.ingest ?? ""],
    ["series, one year (ms)", fmt(fig.seriesYearMs), GOALS.seriesYearMs, load.series ?? ""],
    ["site page ready, Chromium (ms)", fmt(fig.sitePageReadyMs), GOALS.sitePageReadyMs, load.page ?? ""],
    ["server peak RSS (MB)", fmt(fig.peakRssMb), GOALS.peakRssMb, load.memory ?? ""],
  ];
  console.log(["figure".padEnd(38) + "value".padStart(14) + "   " + "goal".padEnd(8) + "load", ...rows.map(([a, b, c, d]) => a.padEnd(38) + b.padStart(14) + "   " + c.padEnd(8) + d)].join("\n"));
  for (const [k, v] of Object.entries(fig.notes)) console.log(`note ${k}: ${v}`);
  return 0;
}

function fmt(v: number | null): string {
  if (v === null) return "n/a";
  return Math.abs(v) >= 1000 ? Math.round(v).toLocaleString("en-GB") : v.toFixed(v < 10 ? 2 : 1);
}

