/**
 * Benchmark: one element's series over a year of 15-minute epochs (35,040) through the service the
 * API route calls (`elementSeries`: the raw read, the typed-array views and the LTTB downsampling to
 * the default 2,000 points, and the formatting with local times). Server time only, no HTTP.
 *
 *   npx tsx test/bench/series.ts [--json] [--quick] [--epochs N]
 *
 * Makes its own database on DATABASE_URL's server (or an embedded PostgreSQL) and drops it after.
 * Data: seeded, written straight into Epoch and ElementResult with generate_series. Prints the median
 * of the runs (and more figures in `notes`); with --json the last line is `{ "seriesYearMs": …, … }`.
 * A measurement, never a pass/fail test: the goal (≤ 50 ms) is reported beside the figure.
 */
import { loadavg } from "node:os";
import { readFileSync } from "node:fs";
import { createTestDatabase } from "../support/database.ts";

const json = process.argv.includes("--json");
const quick = process.argv.includes("--quick");
const epochsArg = process.argv.indexOf("--epochs");
/** A year of 15-minute epochs; `--epochs N` for the scaling runs (test/bench/scaling.ts). */
const EPOCHS = epochsArg >= 0 ? Number(process.argv[epochsArg + 1]) : quick ? 5_000 : 35_040;
const RUNS = quick ? 5 : 25;

/** utime + stime of a local process in ms (clock ticks of 10 ms), or null when /proc cannot tell. */
function backendCpuMs(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
    const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return (Number(fields[11]) + Number(fields[12])) * 10;
  } catch {
    return null;
  }
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

async function main(): Promise<void> {
  const tdb = await createTestDatabase("bench_series");
  process.env.DATABASE_URL = tdb.url;
  // One connection in each pool (Prisma's, and the plain pg pool the packed read goes through), so
  // the PostgreSQL backends doing the work are known (for the CPU-time figure).
  process.env.EPOCHAL_DB_POOL = "1";
  process.env.EPOCHAL_INGEST_POOL = "1";
  const { getDb, closeDb } = await import("../../lib/server/db/client.ts");
  const { pgQuery, closeIngestPools } = await import("../../lib/server/ingest/pg-tx.ts");
  const { elementSeries, readElementArrays } = await import("../../lib/server/series.ts");
  try {
    const db = getDb();
    const site = await db.site.create({ data: { slug: "bench-series", name: "Series benchmark", timeZone: "Europe/Zurich" } });
    const t0 = "2025-01-01T00:00:00Z";
    await db.$executeRawUnsafe(
      `INSERT INTO "Epoch"("siteId", "time", "contentHash") SELECT $1, $2::timestamptz + g * interval '15 minutes', 'b' || g FROM generate_series(0, $3 - 1) g`,
      site.id,
      t0,
      EPOCHS,
    );
    const ref = await db.epoch.findFirst({ where: { siteId: site.id }, orderBy: { time: "asc" } });
    const el = await db.element.create({ data: { siteId: site.id, name: "T1", kind: "triangle", mode: "plan", pointCodes: ["A", "B", "C"], referenceEpochId: ref!.id } });
    // A seasonal cycle, a slow trend and seeded noise (setseed makes random() repeatable).
    await db.$executeRawUnsafe(`SELECT setseed(0.42)`);
    await db.$executeRawUnsafe(
      `INSERT INTO "ElementResult"("elementId", "epochId", "referenceEpochId", "time", status, "greenMax", "greenMin", "maxShear", "arealStrain", "rotationDeg",
         "sigmaGreenMax", "sigmaGreenMin", "sigmaMaxShear", "sigmaArealStrain")
       SELECT $1, e.id, $2, e."time", 'ok', x + 2e-5, x - 2e-5, 4e-5, 2 * x, 1e-3, 1.5e-4, 1.5e-4, 2e-4, 2e-4
         FROM (SELECT id, "time", 1e-4 * sin(extract(epoch FROM "time") / 86400 / 58) + 1e-9 * extract(epoch FROM "time" - $3::timestamptz) / 3600
                      + 3e-5 * (random() - 0.5) AS x
                 FROM "Epoch" WHERE "siteId" = $4) e`,
      el.id,
      ref!.id,
      t0,
      site.id,
    );
    await db.$executeRawUnsafe(`ANALYZE "ElementResult"`);
    const siteRow = { id: site.id, slug: site.slug, name: site.name, timeZone: site.timeZone };
    const query = { quantity: "greenMax" as const, maxPoints: 2000, mode: "cumulative" as const };
    for (let i = 0; i < 3; i++) await elementSeries(db, siteRow, el.id, query); // warm-up (connections, JIT)
    const [{ pid: prismaPid }] = await db.$queryRaw<{ pid: number }[]>`SELECT pg_backend_pid() AS pid`;
    const [{ pid: pgPid }] = await pgQuery<{ pid: number }>(`SELECT pg_backend_pid() AS pid`);
    const backendsCpuMs = (): number | null => {
      const a = backendCpuMs(prismaPid);
      const b = backendCpuMs(pgPid);
      return a === null || b === null ? null : a + b;
    };
    const cpuStart = { node: process.cpuUsage(), pg: backendsCpuMs() };
    const full: number[] = [];
    const read: number[] = [];
    const rate: number[] = [];
    let points = 0;
    let count = 0;
    for (let i = 0; i < RUNS; i++) {
      let a = performance.now();
      const r = await elementSeries(db, siteRow, el.id, query);
      full.push(performance.now() - a);
      points = r.points.length;
      count = r.count;
      a = performance.now();
      await readElementArrays(db, el.id, ref!.id, "greenMax", null, null);
      read.push(performance.now() - a);
      a = performance.now();
      await elementSeries(db, siteRow, el.id, { ...query, mode: "rate" });
      rate.push(performance.now() - a);
    }
    // CPU time per series call, Node.js process plus the PostgreSQL backend: what one call costs when
    // it does not wait for a core (the wall figure on a busy shared machine includes that wait).
    const nodeCpu = process.cpuUsage(cpuStart.node);
    const pgEnd = backendsCpuMs();
    const cpuPerCallMs = pgEnd === null || cpuStart.pg === null ? null : ((nodeCpu.user + nodeCpu.system) / 1000 + (pgEnd - cpuStart.pg)) / (3 * RUNS);
    const out = {
      seriesYearMs: Number(median(full).toFixed(2)),
      notes: {
        seriesYearMs: `median of ${RUNS} runs of elementSeries(greenMax, cumulative, maxPoints 2000) over ${count.toLocaleString("en-GB")} epochs → ${points} points; goal ≤ 50 ms`,
        seriesReadOnlyMs: `${median(read).toFixed(2)} ms median for the raw read into Float64Arrays alone`,
        seriesRateMs: `${median(rate).toFixed(2)} ms median for the rate view of the same year`,
        seriesCpuMs:
          cpuPerCallMs === null
            ? "CPU time not available (/proc of the PostgreSQL backend is not readable: remote server?)"
            : `${cpuPerCallMs.toFixed(2)} ms CPU per call (Node.js ${((nodeCpu.user + nodeCpu.system) / 1000 / (3 * RUNS)).toFixed(2)} + PostgreSQL backends ${((pgEnd! - cpuStart.pg!) / (3 * RUNS)).toFixed(2)}), averaged over all ${3 * RUNS} timed calls (both modes and the raw read)`,
        seriesLoad: `machine load average during the runs: ${loadavg()[0].toFixed(1)} (1 min); figures on a shared machine vary with it`,
      },
    };
    if (json) console.log(JSON.stringify(out));
    else {
      console.log(`series, one year (${count} epochs → ${points} points): ${out.seriesYearMs} ms median (goal ≤ 50 ms)`);
      for (const v of Object.values(out.notes).slice(1)) console.log(`  ${v}`);
      console.log(`  fastest run: ${Math.min(...full).toFixed(2)} ms`);
    }
  } finally {
    await closeDb();
    await closeIngestPools();
    await tdb.drop();
  }
}

main().catch((e) => {
  console.error(e);
  process.exit(1);
});
