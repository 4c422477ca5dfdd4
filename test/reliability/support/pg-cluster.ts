/**
 * A private PostgreSQL cluster for the database-restart test: Debian's initdb and pg_ctl, run as
 * the `postgres` user, in a temporary folder, on a free loopback port, trust auth. Stopping it
 * never touches the machine's shared server on 5432.
 */
import { spawnSync } from "node:child_process";
import { chmodSync, existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { freePort } from "./server.ts";

const PG_BIN = process.env.EPOCHAL_PG_BIN ?? "/usr/lib/postgresql/15/bin";

/** Why a private cluster cannot be made here, or null when it can. */
export function privateClusterUnavailable(): string | null {
  if (!existsSync(join(PG_BIN, "initdb")) || !existsSync(join(PG_BIN, "pg_ctl"))) return `no initdb/pg_ctl in ${PG_BIN} (apt-get install postgresql, or set EPOCHAL_PG_BIN)`;
  const root = typeof process.getuid === "function" && process.getuid() === 0;
  if (root && spawnSync("id", ["postgres"]).status !== 0) return "running as root but there is no `postgres` user to run the server";
  return null;
}

function asPostgres(cmd: string, args: string[]): { status: number | null; out: string } {
  const root = typeof process.getuid === "function" && process.getuid() === 0;
  const r = root ? spawnSync("runuser", ["-u", "postgres", "--", cmd, ...args], { encoding: "utf8" }) : spawnSync(cmd, args, { encoding: "utf8" });
  return { status: r.status, out: `${r.stdout ?? ""}${r.stderr ?? ""}` };
}

export class PrivateCluster {
  readonly dir: string;
  readonly port: number;
  private constructor(dir: string, port: number) {
    this.dir = dir;
    this.port = port;
  }

  get baseUrl(): string {
    return `postgresql://postgres@127.0.0.1:${this.port}/postgres`;
  }

  private get dataDir(): string {
    return join(this.dir, "data");
  }

  static async create(): Promise<PrivateCluster> {
    const dir = mkdtempSync(join(tmpdir(), "epochal-rel-pg-"));
    chmodSync(dir, 0o777);
    const c = new PrivateCluster(dir, await freePort());
    const init = asPostgres(join(PG_BIN, "initdb"), ["-D", c.dataDir, "-U", "postgres", "--auth=trust", "-E", "UTF8", "--no-sync"]);
    if (init.status !== 0) throw new Error(`initdb failed:\n${init.out}`);
    c.start();
    return c;
  }

  /** Starts the server and waits until it accepts connections. */
  start(): void {
    const opts = `-p ${this.port} -h 127.0.0.1 -k ${this.dir} -c fsync=off -c max_connections=100`;
    const r = asPostgres(join(PG_BIN, "pg_ctl"), ["-D", this.dataDir, "-l", join(this.dir, "log"), "-o", opts, "-w", "-t", "60", "start"]);
    if (r.status !== 0) throw new Error(`pg_ctl start failed:\n${r.out}`);
  }

  /** Stops the server at once (fast mode: open sessions are ended, as in a real restart). */
  stop(): void {
    const r = asPostgres(join(PG_BIN, "pg_ctl"), ["-D", this.dataDir, "-m", "fast", "-w", "-t", "60", "stop"]);
    if (r.status !== 0) throw new Error(`pg_ctl stop failed:\n${r.out}`);
  }

  async createDatabase(name: string): Promise<string> {
    const c = new pg.Client({ connectionString: this.baseUrl });
    await c.connect();
    await c.query(`create database "${name}"`);
    await c.end();
    return `postgresql://postgres@127.0.0.1:${this.port}/${name}`;
  }

  destroy(): void {
    asPostgres(join(PG_BIN, "pg_ctl"), ["-D", this.dataDir, "-m", "immediate", "-w", "stop"]);
    rmSync(this.dir, { recursive: true, force: true });
  }
}
