/**
 * How cost grows with size: the strain kernel, the backfill, one live epoch and a series read at
 * sizes 10× apart, with the growth exponent between neighbouring sizes (log(t₂/t₁) / log(n₂/n₁):
 * 1 is linear, above 1 worse than linear). Not a timed test: it prints a table.
 *
 *   node --import tsx test/bench/scaling.ts [--long] [--json] [--only kernel,backfill,live,series]
 *
 * Sizes span 1,000× (four sizes 10× apart): kernel 1e4…1e7 triangle-epochs, a live epoch of 20…20,000
 * points (39,000 elements at the top), series of 350…350,400 epochs (ten years of 15-minute epochs);
 * the backfill 1,750…1.75 M observations, and with --long also scale 1 (17.5 M observations, a year of
 * 500 points, which alone takes over half an hour on a shared 2-core machine). The kernel runs here;
 * the others run the benchmark scripts beside this
 * one (ingest.ts --only backfill|live, series.ts --epochs) and read their JSON line. The live epoch
 * runs in-process (route handler, no HTTP server) so that no build is needed.
 * Needs DATABASE_URL's server or the embedded default (each script makes its own database).
 */
import { spawnSync } from "node:child_process";
import { loadavg } from "node:os";
import { computeTriangleBatch, createTriangleBatchOut } from "../../lib/strain/batch.ts";
import { mulberry32 } from "../../seed/random.ts";

const argv = process.argv.slice(2);
const long = argv.includes("--long");
const json = argv.includes("--json");
const onlyIdx = argv.indexOf("--only");
const only = onlyIdx >= 0 ? new Set(argv[onlyIdx + 1].split(",")) : null;
const want = (n: string): boolean => !only || only.has(n);
const say = (m: string): void => {
  if (json) console.error(m);
  else console.log(m);
};

type Row = { what: string; size: number; unit: string; figure: number; figureUnit: string; perItem: number; load: number; note?: string };
const rows: Row[] = [];


function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** 1,000 triangles × slots/1,000 epochs, same shapes and noise as kernel.ts; CPU seconds, median of runs. */
function kernelAt(slots: number): number {
  const nTri = 1000;
  const rnd = mulberry32(20240301);
  const refXY = new Float64Array(6 * nTri);
  for (let t = 0; t < nTri; t++) {
    const x0 = 500000 + 2000 * rnd(), y0 = 5000000 + 2000 * rnd(), s = 5 + 45 * rnd();
    const v = [0, 0, s, 0.2 * s * (rnd() - 0.5), 0.5 * s + 0.3 * s * (rnd() - 0.5), 0.7 * s + 0.3 * s * rnd()];
    for (let k = 0; k < 6; k += 2) {
      refXY[6 * t + k] = x0 + v[k];
      refXY[6 * t + k + 1] = y0 + v[k + 1];
    }
  }
  const curXY = new Float64Array(6 * slots);
  for (let i = 0; i < curXY.length; i++) curXY[i] = refXY[i % (6 * nTri)] + 0.002 * (rnd() - 0.5);
  const out = createTriangleBatchOut(slots, false);
  computeTriangleBatch({ refXY, curXY }, out);
  const runs = slots >= 1e7 ? 3 : 7;
  const times: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = process.cpuUsage();
    computeTriangleBatch({ refXY, curXY }, out);
    const d = process.cpuUsage(t0);
    times.push((d.user + d.system) / 1e6);
  }
  return median(times);
}

function script(file: string, args: string[]): Record<string, unknown> | null {
  const r = spawnSync(process.execPath, ["--import", "tsx", `test/bench/${file}`, "--json", ...args], { encoding: "utf8", maxBuffer: 64 << 20, stdio: ["ignore", "pipe", "pipe"], env: process.env });
  const line = (r.stdout ?? "").trim().split("\n").pop() ?? "";
  try {
    return r.status === 0 ? (JSON.parse(line) as Record<string, unknown>) : null;
  } catch {
    return null;
  } finally {
    if (r.status !== 0) say(`  ${file} ${args.join(" ")} failed: ${(r.stderr ?? "").trim().split("\n").slice(-2).join(" ")}`);
  }
}

if (want("kernel")) {
  for (const n of [1e4, 1e5, 1e6, 1e7]) {
    say(`kernel ${n.toExponential(0)} triangle-epochs …`);
    const s = kernelAt(n);
    rows.push({ what: "strain kernel", size: n, unit: "triangle-epochs", figure: s * 1e3, figureUnit: "ms CPU", perItem: (s * 1e9) / n, load: loadavg()[0] });
  }
}
if (want("backfill")) {
  for (const scale of long ? [0.001, 0.01, 0.1, 1] : [0.001, 0.01, 0.1]) {
    say(`backfill scale ${scale} …`);
    const o = script("ingest.ts", ["--only", "backfill", "--scale", String(scale)]);
    if (!o) continue;
    const n = Number(o.backfillObservations);
    const rate = Number(o.backfillObservationsPerS);
    rows.push({ what: "backfill (ingest)", size: n, unit: "observations", figure: (n / rate) * 1e3, figureUnit: "ms wall", perItem: 1e9 / rate, load: loadavg()[0], note: `ratio to COPY ${o.backfillRatioToCopy}` });
  }
}
if (want("live")) {
  for (const pts of [20, 200, 2000, 20000]) {
    say(`live epoch ${pts} points …`);
    const o = script("ingest.ts", ["--only", "live", "--mode", "in-process", "--live-points", String(pts), "--live-posts", pts >= 20000 ? "8" : "20"]);
    if (!o) continue;
    const p50 = Number(o.liveEpochP50Ms);
    rows.push({ what: "live epoch (in-process)", size: pts, unit: "points", figure: p50, figureUnit: "ms p50", perItem: (p50 * 1e6) / pts, load: loadavg()[0], note: `${o.liveElements} elements, p95 ${o.liveEpochP95Ms} ms` });
  }
}
if (want("series")) {
  for (const ep of [350, 3504, 35040, 350400]) {
    say(`series ${ep} epochs …`);
    const o = script("series.ts", ["--epochs", String(ep)]);
    if (!o) continue;
    const ms = Number(o.seriesYearMs);
    rows.push({ what: "series read (one element)", size: ep, unit: "epochs", figure: ms, figureUnit: "ms median", perItem: (ms * 1e6) / ep, load: loadavg()[0] });
  }
}

/** Growth exponent from the previous row of the same benchmark. */
const exponent = (i: number): string => {
  const r = rows[i], p = rows[i - 1];
  if (!p || p.what !== r.what) return "";
  return (Math.log(r.figure / p.figure) / Math.log(r.size / p.size)).toFixed(2);
};
if (json) console.log(JSON.stringify({ rows: rows.map((r, i) => ({ ...r, exponent: exponent(i) || null })) }));
else {
  console.log("\nbenchmark                    size                        time              ns per item   exponent   load   note");
  rows.forEach((r, i) =>
    console.log(
      `${r.what.padEnd(28)} ${`${r.size.toLocaleString("en-GB")} ${r.unit}`.padEnd(27)} ${`${r.figure.toFixed(1)} ${r.figureUnit}`.padEnd(17)} ${r.perItem.toFixed(1).padStart(11)}   ${exponent(i).padStart(8)}   ${r.load.toFixed(1).padStart(4)}   ${r.note ?? ""}`,
    ),
  );
  console.log("exponent: log(t₂/t₁)/log(n₂/n₁) against the size above; 1 = linear. Sizes 10× apart; --long adds the full-year backfill.");
}
