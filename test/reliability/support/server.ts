/**
 * One production server (`next start` on the build in EPOCHAL_DIST_DIR) on a loopback port, that a
 * reliability test may kill (SIGKILL), stop and start again on the same port and database.
 * Traffic goes only to 127.0.0.1.
 */
import { spawn, type ChildProcess } from "node:child_process";
import { createServer } from "node:net";

export function freePort(): Promise<number> {
  return new Promise((ok, fail) => {
    const s = createServer();
    s.once("error", fail);
    s.listen(0, "127.0.0.1", () => {
      const a = s.address();
      s.close(() => ok(typeof a === "object" && a ? a.port : 0));
    });
  });
}

export const sleep = (ms: number) => new Promise<void>((r) => setTimeout(r, ms));

export type ServerOptions = {
  databaseUrl: string;
  /** Extra environment for the server (SMTP_URL, mail retry settings, …). */
  env?: Record<string, string>;
  /** Print the server's stderr (default: only when RELIABILITY_VERBOSE is set). */
  verbose?: boolean;
};

export class TestServer {
  readonly port: number;
  readonly baseUrl: string;
  private proc: ChildProcess | null = null;
  private readonly opts: ServerOptions;
  /** The server's stderr, kept so a test can show what the server logged (the last 200 kB). */
  stderr = "";
  starts = 0;

  private constructor(port: number, opts: ServerOptions) {
    this.port = port;
    this.baseUrl = `http://127.0.0.1:${port}`;
    this.opts = opts;
  }

  static async start(opts: ServerOptions): Promise<TestServer> {
    const s = new TestServer(await freePort(), opts);
    await s.startProcess();
    return s;
  }

  get pid(): number | undefined {
    return this.proc?.pid;
  }

  get running(): boolean {
    return this.proc !== null && this.proc.exitCode === null && this.proc.signalCode === null;
  }

  /** Starts `next start` and waits until the process listens (health answers, whatever its status). */
  async startProcess(timeoutMs = 60_000): Promise<void> {
    if (this.running) throw new Error("server already running");
    const verbose = this.opts.verbose ?? Boolean(process.env.RELIABILITY_VERBOSE);
    const proc = spawn(process.execPath, ["node_modules/next/dist/bin/next", "start", "-p", String(this.port), "-H", "127.0.0.1"], {
      env: {
        ...process.env,
        DATABASE_URL: this.opts.databaseUrl,
        NEXT_TELEMETRY_DISABLED: "1",
        EPOCHAL_PUBLIC_URL: this.baseUrl,
        EPOCHAL_TEST_MODE: "1",
        ...(this.opts.env ?? {}),
      },
      stdio: ["ignore", "ignore", "pipe"],
    });
    proc.stderr?.on("data", (c: Buffer) => {
      this.stderr = (this.stderr + c.toString()).slice(-200_000);
      if (verbose) process.stderr.write(c);
    });
    this.proc = proc;
    this.starts += 1;
    const deadline = Date.now() + timeoutMs;
    for (;;) {
      try {
        const r = await fetch(`${this.baseUrl}/api/health`);
        await r.arrayBuffer();
        return;
      } catch {
        /* not listening yet */
      }
      if (!this.running) throw new Error(`next start exited (${proc.exitCode ?? proc.signalCode}):\n${this.stderr.slice(-3000)}`);
      if (Date.now() > deadline) throw new Error(`next start did not listen within ${timeoutMs} ms`);
      await sleep(100);
    }
  }

  /** Waits until /api/health answers 200 (database up). */
  async waitHealthy(timeoutMs = 60_000): Promise<number> {
    const t0 = Date.now();
    for (;;) {
      try {
        const r = await fetch(`${this.baseUrl}/api/health`);
        await r.arrayBuffer();
        if (r.status === 200) return Date.now() - t0;
      } catch {
        /* down */
      }
      if (Date.now() - t0 > timeoutMs) throw new Error(`health did not answer 200 within ${timeoutMs} ms`);
      await sleep(100);
    }
  }

  /** Kills the server (SIGKILL: no shutdown code runs) and waits for the process to be gone. */
  async kill(signal: NodeJS.Signals = "SIGKILL"): Promise<void> {
    const p = this.proc;
    if (!p || !this.running) return;
    const gone = new Promise<void>((r) => p.once("exit", () => r()));
    p.kill(signal);
    await Promise.race([gone, sleep(10_000)]);
    if (this.running) {
      p.kill("SIGKILL");
      await gone;
    }
  }

  async stop(): Promise<void> {
    await this.kill("SIGTERM");
  }
}
