/**
 * Benchmark of the batch strain kernel (lib/strain/batch.ts) against the same computation vectorised
 * in numpy (test/bench/kernel_numpy.py, single-threaded), on 1,000,000 seeded triangle-epochs
 * (1,000 triangles × 1,000 epochs). Checks that both give the same outputs, prints medians of several
 * runs and their ratio. Not a timed test.
 *
 * Times are CPU seconds of the process (Node: process.cpuUsage; Python: time.process_time), not wall
 * time, so that other work on a shared machine skews both sides less. Both sides run one thread.
 *
 *   npx tsx test/bench/kernel.ts [--json] [--runs N]
 */
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { computeTriangleBatch, createTriangleBatchOut } from "../../lib/strain/batch.ts";
import { mulberry32 } from "../../seed/random.ts";

const N_TRI = 1000;
const N_EP = 1000;
const SLOTS = N_TRI * N_EP;
const SEED = 20240301;
const args = process.argv.slice(2);
const asJson = args.includes("--json");
const runsArg = args.indexOf("--runs");
const RUNS = runsArg >= 0 ? Number(args[runsArg + 1]) : 7;


function makeData(): { refXY: Float64Array; curXY: Float64Array; sigmaRef: Float64Array; sigmaCur: Float64Array } {
  const rnd = mulberry32(SEED);
  const refXY = new Float64Array(6 * N_TRI);
  for (let t = 0; t < N_TRI; t++) {
    const x0 = 500000 + 2000 * rnd();
    const y0 = 5000000 + 2000 * rnd();
    const s = 5 + 45 * rnd();
    const v = [0, 0, s, 0.2 * s * (rnd() - 0.5), 0.5 * s + 0.3 * s * (rnd() - 0.5), 0.7 * s + 0.3 * s * rnd()];
    for (let k = 0; k < 6; k += 2) {
      refXY[6 * t + k] = x0 + v[k];
      refXY[6 * t + k + 1] = y0 + v[k + 1];
    }
  }
  const curXY = new Float64Array(6 * SLOTS);
  for (let s = 0; s < SLOTS; s++) {
    const t = s % N_TRI;
    const h = [0.004 * (rnd() - 0.5), 0.004 * (rnd() - 0.5), 0.004 * (rnd() - 0.5), 0.004 * (rnd() - 0.5)];
    const tx = 0.05 * (rnd() - 0.5);
    const ty = 0.05 * (rnd() - 0.5);
    for (let k = 0; k < 6; k += 2) {
      const dx = refXY[6 * t + k] - refXY[6 * t];
      const dy = refXY[6 * t + k + 1] - refXY[6 * t + 1];
      curXY[6 * s + k] = refXY[6 * t + k] + h[0] * dx + h[1] * dy + tx + 0.002 * (rnd() - 0.5);
      curXY[6 * s + k + 1] = refXY[6 * t + k + 1] + h[2] * dx + h[3] * dy + ty + 0.002 * (rnd() - 0.5);
    }
  }
  const sigmaRef = new Float64Array(refXY.length).fill(0.001);
  const sigmaCur = new Float64Array(curXY.length).fill(0.001);
  return { refXY, curXY, sigmaRef, sigmaCur };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

function timeKernel(input: Parameters<typeof computeTriangleBatch>[0], out: ReturnType<typeof createTriangleBatchOut>): number {
  computeTriangleBatch(input, out); // warm-up (JIT)
  computeTriangleBatch(input, out);
  const times: number[] = [];
  for (let r = 0; r < RUNS; r++) {
    const t0 = process.cpuUsage();
    computeTriangleBatch(input, out);
    const dt = process.cpuUsage(t0);
    times.push((dt.user + dt.system) / 1e6);
  }
  return median(times);
}

const data = makeData();
const out = createTriangleBatchOut(SLOTS, false);
const kernelS = timeKernel({ refXY: data.refXY, curXY: data.curXY }, out);
const outSigma = createTriangleBatchOut(SLOTS, true);
const kernelSigmaS = timeKernel(data, outSigma);

// numpy, fed the same data through binary float64 files in a temp dir.
const dir = mkdtempSync(join(tmpdir(), "epochal-bench-"));
let numpyS = NaN;
let maxDiff = { F: 0, green: 0, principal: 0, azimuthDeg: 0, rotationDeg: 0, areal: 0 };
let numpyVersion = "";
try {
  const refPath = join(dir, "ref.bin");
  const curPath = join(dir, "cur.bin");
  const outPath = join(dir, "out.bin");
  writeFileSync(refPath, new Uint8Array(data.refXY.buffer));
  writeFileSync(curPath, new Uint8Array(data.curXY.buffer));
  const script = fileURLToPath(new URL("./kernel_numpy.py", import.meta.url));
  const threadEnv = { OMP_NUM_THREADS: "1", OPENBLAS_NUM_THREADS: "1", MKL_NUM_THREADS: "1", NUMEXPR_NUM_THREADS: "1", VECLIB_MAXIMUM_THREADS: "1" };
  const py = spawnSync("python3", [script, refPath, curPath, String(N_TRI), String(N_EP), outPath, String(RUNS)], { encoding: "utf8", env: { ...process.env, ...threadEnv } });
  if (py.status !== 0) throw new Error(`numpy benchmark failed: ${py.stderr}`);
  const res = JSON.parse(py.stdout.trim().split("\n").pop() as string) as { medianS: number; numpy: string };
  numpyS = res.medianS;
  numpyVersion = res.numpy;
  const buf = readFileSync(outPath);
  const np = new Float64Array(buf.buffer, buf.byteOffset, buf.byteLength / 8);
  const C = 13;
  const rel = (a: number, b: number, scale: number): number => Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), scale);
  for (let s = 0; s < SLOTS; s++) {
    const o = C * s;
    for (let k = 0; k < 4; k++) maxDiff.F = Math.max(maxDiff.F, rel(out.F[4 * s + k], np[o + k], 1));
    for (let k = 0; k < 3; k++) maxDiff.green = Math.max(maxDiff.green, rel(out.green[3 * s + k], np[o + 4 + k], 1e-6));
    maxDiff.principal = Math.max(maxDiff.principal, rel(out.greenMax[s], np[o + 7], 1e-6), rel(out.greenMin[s], np[o + 8], 1e-6), rel(out.maxShear[s], np[o + 12], 1e-6));
    let dAz = Math.abs(out.azimuthMaxDeg[s] - np[o + 9]);
    dAz = Math.min(dAz, 180 - dAz);
    maxDiff.azimuthDeg = Math.max(maxDiff.azimuthDeg, dAz);
    maxDiff.rotationDeg = Math.max(maxDiff.rotationDeg, Math.abs(out.rotationDeg[s] - np[o + 10]));
    maxDiff.areal = Math.max(maxDiff.areal, rel(out.arealStrain[s], np[o + 11], 1e-6));
  }
} finally {
  rmSync(dir, { recursive: true, force: true });
}

/** Agreement required: strains to 1e-9 of max(|value|, 1e-6), F to 1e-12, angles to 1e-6°. */
const agree = maxDiff.F < 1e-12 && maxDiff.green < 1e-9 && maxDiff.principal < 1e-9 && maxDiff.areal < 1e-9 && maxDiff.azimuthDeg < 1e-6 && maxDiff.rotationDeg < 1e-9;
const kernelRate = SLOTS / kernelS;
const numpyRate = SLOTS / numpyS;
const result = { kernelTriangleEpochsPerS: kernelRate, numpyTriangleEpochsPerS: numpyRate, kernelRatioToNumpy: kernelRate / numpyRate };
if (asJson) {
  console.log(JSON.stringify(result));
} else {
  const fmt = (x: number): string => x.toExponential(3);
  console.log(`batch strain kernel, ${SLOTS.toLocaleString("en")} seeded triangle-epochs (${N_TRI} triangles × ${N_EP} epochs), median of ${RUNS} runs`);
  console.log(["", "implementation                      triangle-epochs/s   median (ms)", "----------------------------------  -----------------   -----------",
    `kernel (F, E, principal, axis, rot) ${fmt(kernelRate).padStart(17)}   ${(kernelS * 1e3).toFixed(1).padStart(11)}`,
    `kernel + σ of 4 quantities          ${fmt(SLOTS / kernelSigmaS).padStart(17)}   ${(kernelSigmaS * 1e3).toFixed(1).padStart(11)}`,
    `numpy ${numpyVersion.padEnd(8)} 1 thread, same outputs ${fmt(numpyRate).padStart(13)}   ${(numpyS * 1e3).toFixed(1).padStart(11)}`,
    "", `ratio kernel / numpy: ${result.kernelRatioToNumpy.toFixed(2)}×   (goal ≥ 4×)`,
    `outputs agree: ${agree ? "yes" : "NO"}  (max differences ${JSON.stringify(maxDiff)})`].join("\n"));
}
if (!agree) process.exitCode = 1;
