/**
 * Starting the dashboard: find or start the database, apply migrations, build the app when no
 * production build exists, then run `next start` with DATABASE_URL pointing at the database.
 * The launcher stays attached to the embedded database while the server runs and releases it
 * when the server stops (Ctrl-C stops both).
 */
import { spawn, spawnSync } from "node:child_process";
import { existsSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { openDatabaseUrl } from "../db/connect.ts";
import { applyMigrations, projectRoot } from "../db/migrate.ts";

export type ServeOptions = {
  port: number;
  host: string;
  afterMigrate?: (databaseUrl: string) => Promise<string[] | void>;
  rebuild?: boolean;
};

function nextBin(root: string): string {
  return join(root, "node_modules", "next", "dist", "bin", "next");
}

function distDir(): string {
  return process.env.EPOCHAL_DIST_DIR ?? ".next";
}

/**
 * What the build was made from: the commit, and each changed or new file under app/ and lib/ with
 * its size and modification time (so that editing a file that was already changed also counts).
 */
export function sourceStamp(root: string): string {
  const head = spawnSync("git", ["rev-parse", "HEAD"], { cwd: root }).stdout?.toString().trim();
  const dirty = (spawnSync("git", ["status", "--porcelain", "--untracked-files=all", "app", "lib"], { cwd: root }).stdout?.toString() ?? "")
    .split("\n")
    .filter((l) => l.trim() !== "")
    .map((l) => {
      const file = join(root, l.slice(3).trim());
      const st = existsSync(file) ? statSync(file) : null;
      return `${l} ${st ? `${st.size}@${st.mtimeMs}` : "gone"}`;
    });
  return [head, ...dirty].join("\n");
}

function buildIsStale(root: string): boolean {
  const id = join(root, distDir(), "BUILD_ID");
  if (!existsSync(id)) return true;
  const marker = join(root, distDir(), "epochal-source-stamp");
  if (!existsSync(marker)) return true;
  return readFileSync(marker, "utf8") !== sourceStamp(root) || statSync(id).size === 0;
}

export function ensureBuild(root = projectRoot(), force = false): void {
  if (!force && !buildIsStale(root)) return;
  console.log("Building the dashboard (next build) …");
  const r = spawnSync(process.execPath, [nextBin(root), "build"], { cwd: root, stdio: "inherit", env: { ...process.env, NEXT_TELEMETRY_DISABLED: "1" } });
  if (r.status !== 0) throw new Error("next build failed");
  writeFileSync(join(root, distDir(), "epochal-source-stamp"), sourceStamp(root));
}

/**
 * Node options for the `next start` process. By default a larger young generation (below).
 * EPOCHAL_SERVER_HEAP_MB caps V8's old space (and keeps the young generation small): V8 grows its heap lazily, so an uncapped server's resident set
 * mostly reflects garbage not yet collected (test/bench/memory.ts: 445 MB peak uncapped, 239 MB
 * with a 128 MB cap, same work). It is not set by default because the largest upload needs far
 * more: a 50 MB epoch file (EPOCHAL_MAX_UPLOAD_BYTES) took about 700 MB of heap to parse and store,
 * and a heap too small for a request stops the server. Lower the upload limit with the cap.
 */
export function serverNodeOptions(env: Readonly<Record<string, string | undefined>> = process.env): string | undefined {
  const mb = Number(env.EPOCHAL_SERVER_HEAP_MB);
  const capped = Number.isFinite(mb) && mb >= 64;
  // Uncapped, the young generation may grow to 32 MB semi-spaces (V8's default is 16 MB): a live
  // epoch's request keeps a few megabytes alive across its scavenges, and half as many scavenges cut
  // the live-epoch p95 by 15–20 ms (test/bench/ingest.ts, three runs each way) for at most ~50 MB more RSS.
  // The price: a large backfill parses 11–20 % slower in-process with it (bigger scavenges of the
  // parser's short-lived rows); live latency was the goal still missed, so it is the default.
  const young = /--max-semi-space-size/.test(env.NODE_OPTIONS ?? "") ? "" : capped ? " --max-semi-space-size=4" : "--max-semi-space-size=32";
  const own = capped ? `--max-old-space-size=${Math.floor(mb)}${young}` : young;
  const joined = [env.NODE_OPTIONS ?? "", own].filter(Boolean).join(" ");
  return joined || undefined;
}

export async function serve(opts: ServeOptions): Promise<number> {
  const root = projectRoot();
  const target = await openDatabaseUrl((m) => console.log(m));
  const mig = await applyMigrations(target.url);
  console.log(mig.applied.length ? `Applied ${mig.applied.length} migration(s).` : `Database up to date (${mig.total} migrations).`);
  // First administrator from EPOCHAL_ADMIN_EMAIL / EPOCHAL_ADMIN_PASSWORD while no user exists.
  const { ensureFirstAdmin } = await import("../users.ts");
  const admin = await ensureFirstAdmin();
  const notes = [...(admin ? [admin] : []), ...((await opts.afterMigrate?.(target.url)) ?? [])];
  ensureBuild(root, opts.rebuild ?? false);
  const child = spawn(process.execPath, [nextBin(root), "start", "-p", String(opts.port), "-H", opts.host], {
    cwd: root,
    stdio: ["ignore", "pipe", "inherit"],
    env: { ...process.env, NODE_OPTIONS: serverNodeOptions(), DATABASE_URL: target.url, NEXT_TELEMETRY_DISABLED: "1", EPOCHAL_PUBLIC_URL: process.env.EPOCHAL_PUBLIC_URL ?? `http://localhost:${opts.port}` },
  });
  child.stdout?.on("data", (chunk: Buffer) => {
    const text = chunk.toString();
    process.stdout.write(text);
    if (/Ready in|started server/i.test(text)) {
      console.log(`\n  Epochal is running at http://localhost:${opts.port}`);
      for (const n of notes) console.log(`  ${n}`);
      console.log(`  Database: ${target.embedded ? "embedded PostgreSQL in .epochal-data/ (stops with the server)" : "DATABASE_URL"}`);
      console.log("  Stop with Ctrl-C.\n");
    }
  });
  const stop = (sig: NodeJS.Signals) => {
    if (child.exitCode === null) child.kill(sig);
  };
  process.on("SIGINT", () => stop("SIGINT"));
  process.on("SIGTERM", () => stop("SIGTERM"));
  const code: number = await new Promise((res) => child.on("exit", (c, s) => res(c ?? (s ? 128 + 15 : 1))));
  await target.detach();
  return code;
}

export function parsePort(args: string[]): { port: number; host: string; rebuild: boolean } {
  let port = Number(process.env.PORT ?? 3000);
  let host = process.env.HOST ?? "0.0.0.0";
  let rebuild = false;
  for (let i = 0; i < args.length; i++) {
    if (args[i] === "--port") port = Number(args[++i]);
    else if (args[i] === "--host") host = String(args[++i]);
    else if (args[i] === "--rebuild") rebuild = true;
  }
  if (!Number.isInteger(port) || port <= 0 || port > 65535) throw new Error(`--port: not a port number`);
  return { port, host, rebuild };
}
