/**
 * `epochal bench`: runs every benchmark script under test/bench/ (each prints one JSON object as
 * its last line when given --json), then prints one table, or one JSON object with --json.
 * Benchmarks are measurements, never pass/fail tests; a goal missed is reported, not hidden.
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { cpus, totalmem, release } from "node:os";
import { join } from "node:path";

export const help = `Usage: epochal bench [--json] [--only NAME[,NAME]] [--quick]

Runs the benchmarks in test/bench/ against DATABASE_URL's PostgreSQL server (each makes a
database of its own) and prints one table with the goals beside the figures.
  --json    print one JSON object: kernelTriangleEpochsPerS, kernelRatioToNumpy,
            backfillObservationsPerS, backfillRatioToCopy, liveEpochP50Ms, liveEpochP95Ms,
            seriesYearMs, sitePageReadyMs, peakRssMb, notes
  --only    run some of: kernel, ingest, series, page
  --quick   smaller data (for a smoke run; figures are then not comparable with the goals)`;

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

const SCRIPTS = [
  { name: "kernel", file: "kernel.ts", keys: ["kernelTriangleEpochsPerS", "kernelRatioToNumpy"] },
  { name: "ingest", file: "ingest.ts", keys: ["backfillObservationsPerS", "backfillRatioToCopy", "liveEpochP50Ms", "liveEpochP95Ms"] },
  { name: "series", file: "series.ts", keys: ["seriesYearMs"] },
  { name: "page", file: "page.ts", keys: ["sitePageReadyMs", "peakRssMb"] },
] as const;

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

export async function run(args: string[]): Promise<number> {
  const json = args.includes("--json");
  const quick = args.includes("--quick");
  const onlyIdx = args.indexOf("--only");
  const only = onlyIdx >= 0 ? new Set(String(args[onlyIdx + 1] ?? "").split(",")) : null;
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
  for (const s of SCRIPTS) {
    if (only && !only.has(s.name)) continue;
    const file = join("test", "bench", s.file);
    if (!existsSync(file)) {
      for (const k of s.keys) fig.notes[k] = `benchmark ${file} is missing`;
      continue;
    }
    if (!json) console.error(`running ${file} …`);
    const r = spawnSync(process.execPath, ["--import", "tsx", file, "--json", ...(quick ? ["--quick"] : [])], {
      encoding: "utf8",
      maxBuffer: 64 * 1024 * 1024,
      stdio: ["ignore", "pipe", json ? "pipe" : "inherit"],
      env: process.env,
    });
    const out = lastJson(r.stdout ?? "");
    if (r.status !== 0 || !out) {
      for (const k of s.keys) fig.notes[k] = `${s.name} benchmark failed (exit ${r.status}): ${(r.stderr ?? "").trim().split("\n").slice(-2).join(" ")}`;
      continue;
    }
    for (const k of s.keys) {
      const v = out[k];
      (fig as Record<string, unknown>)[k] = typeof v === "number" && Number.isFinite(v) ? v : null;
      if (fig[k as keyof Figures] === null) fig.notes[k] = String((out.notes as Record<string, string> | undefined)?.[k] ?? "not measured");
    }
    const n = out.notes as Record<string, string> | undefined;
    if (n) for (const [k, v] of Object.entries(n)) fig.notes[k] ??= v;
  }
  fig.notes.machine = `${cpus().length} × ${cpus()[0]?.model ?? "cpu"}, ${(totalmem() / 2 ** 30).toFixed(0)} GiB, Linux ${release()}, Node ${process.version}`;
  if (quick) fig.notes.quick = "run with --quick: reduced data sizes";
  if (json) {
    console.log(JSON.stringify(fig));
    return 0;
  }
  const rows: [string, string, string][] = [
    ["strain kernel (triangle-epochs/s)", fmt(fig.kernelTriangleEpochsPerS), ""],
    ["kernel ÷ numpy", fmt(fig.kernelRatioToNumpy), GOALS.kernelRatioToNumpy],
    ["backfill (observations/s)", fmt(fig.backfillObservationsPerS), ""],
    ["backfill ÷ COPY", fmt(fig.backfillRatioToCopy), GOALS.backfillRatioToCopy],
    ["live epoch 2,000 pts p50 (ms)", fmt(fig.liveEpochP50Ms), ""],
    ["live epoch 2,000 pts p95 (ms)", fmt(fig.liveEpochP95Ms), GOALS.liveEpochP95Ms],
    ["series, one year (ms)", fmt(fig.seriesYearMs), GOALS.seriesYearMs],
    ["site page ready (ms)", fmt(fig.sitePageReadyMs), GOALS.sitePageReadyMs],
    ["server peak RSS (MB)", fmt(fig.peakRssMb), GOALS.peakRssMb],
  ];
  console.log(["figure".padEnd(34) + "value".padStart(14) + "   goal", ...rows.map(([a, b, c]) => a.padEnd(34) + b.padStart(14) + "   " + c)].join("\n"));
  for (const [k, v] of Object.entries(fig.notes)) console.log(`note ${k}: ${v}`);
  return 0;
}

function fmt(v: number | null): string {
  if (v === null) return "n/a";
  return Math.abs(v) >= 1000 ? Math.round(v).toLocaleString("en-GB") : v.toFixed(v < 10 ? 2 : 1);
}

