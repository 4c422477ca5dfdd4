/**
 * `epochal seed write|load`: the demo scenario as files (to try the upload page and `epochal push` or
 * `epochal strain` by hand), or loaded into the database without starting the server.
 */
import { mkdir, writeFile } from "node:fs/promises";
import { dirname, join, resolve } from "node:path";
import { generateScenario, DEFAULT_SEED } from "../../../../seed/scenario.ts";
import { FILE_FORMATS, scenarioFiles, type FileFormat } from "../../../../seed/files.ts";
import { seedDemo } from "../../../../seed/demo.ts";
import { demoCredentialLines } from "../../../../seed/demo-users.ts";
import { openDatabaseUrl } from "../../db/connect.ts";
import { applyMigrations } from "../../db/migrate.ts";

export const help = `Usage:
  epochal seed write --out DIR [--format csv|json|geojson] [--epochs N] [--seed S] [--start ISO]
  epochal seed load [--quiet]

write  Writes the demo scenario as files in DIR: epochs/epoch-NNNN-<time>.<ext> (one file per epoch,
       in the format ingest reads; GeoJSON positions in WGS84 about the site's origin), points.csv,
       elements.csv (the hand-made elements, for \`epochal strain --elements\`) and site.json (the
       site's settings, origin and events). --epochs N makes a shorter scenario (default 730, six
       months at 6 h); --seed changes the noise (default ${DEFAULT_SEED}); --start moves the dates.
load   Loads the demo site into the database (DATABASE_URL, or the embedded one) through the ingest
       service, like \`epochal demo\` but without starting the server. Idempotent.

Exit status 2 for bad options.`;

function usageError(message: string): number {
  console.error(`epochal seed: ${message}\n\n${help}`);
  return 2;
}

async function write(args: string[]): Promise<number> {
  let out: string | null = null;
  let format: FileFormat = "csv";
  let epochs: number | undefined;
  let seed = DEFAULT_SEED;
  let start: string | undefined;
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    const next = (): string | null => (i + 1 < args.length ? args[++i] : null);
    if (a === "--out") out = next();
    else if (a === "--format") {
      const f = next();
      if (!f || !(FILE_FORMATS as readonly string[]).includes(f)) return usageError(`--format: one of ${FILE_FORMATS.join(", ")}`);
      format = f as FileFormat;
    } else if (a === "--epochs") {
      const v = Number(next());
      if (!Number.isInteger(v) || v < 1 || v > 100_000) return usageError("--epochs: a whole number from 1 to 100000");
      epochs = v;
    } else if (a === "--seed") {
      const v = Number(next());
      if (!Number.isInteger(v)) return usageError("--seed: a whole number");
      seed = v;
    } else if (a === "--start") {
      const v = next();
      if (!v || !Number.isFinite(Date.parse(v)) || !/(Z|[+-]\d{2}:?\d{2})$/i.test(v)) return usageError("--start: an ISO 8601 date-time with Z or an offset");
      start = v;
    } else return usageError(`unknown option ${a}`);
  }
  if (!out) return usageError("--out DIR is required");
  const sc = generateScenario({ seed, ...(epochs ? { epochs } : {}), ...(start ? { start } : {}) });
  const files = scenarioFiles(sc, format);
  const root = resolve(out);
  for (const f of files) {
    const path = join(root, ...f.path.split("/"));
    await mkdir(dirname(path), { recursive: true });
    await writeFile(path, f.text);
  }
  console.log(`Wrote ${sc.epochs.length} ${format} epoch files, points.csv, elements.csv and site.json to ${root}`);
  console.log(`Site "${sc.site.name}" (${sc.site.slug}), ${sc.points.length} targets, time zone ${sc.site.timeZone}, origin ${sc.site.originLatDeg}° N ${sc.site.originLonDeg}° E.`);
  return 0;
}

async function load(args: string[]): Promise<number> {
  const quiet = args.includes("--quiet");
  const bad = args.find((a) => a !== "--quiet");
  if (bad) return usageError(`unknown option ${bad}`);
  const target = await openDatabaseUrl((m) => console.log(m));
  try {
    await applyMigrations(target.url);
    const r = await seedDemo({ databaseUrl: target.url, quiet });
    console.log(`Demo site ${r.siteSlug}: ${r.epochsStored} epochs (${r.epochsCreated} new), ${r.alertsOpen} open alerts, ${r.alertsCleared} cleared.`);
    for (const l of demoCredentialLines()) console.log(l);
  } finally {
    await target.detach();
  }
  return 0;
}

export async function run(args: string[]): Promise<number> {
  const [sub, ...rest] = args;
  if (sub === "write") return write(rest);
  if (sub === "load") return load(rest);
  return usageError(sub ? `unknown subcommand ${sub}` : "give a subcommand: write or load");
}
