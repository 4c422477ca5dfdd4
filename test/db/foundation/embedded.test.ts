import { describe, expect, it } from "vitest";
import { spawn, spawnSync } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { attachEmbeddedDatabase, readPostmaster } from "../../../lib/server/db/embedded.ts";

function isAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

function startHolder(dataDir: string): Promise<{ url: string; started: boolean; release: () => Promise<void> }> {
  const child = spawn(process.execPath, ["--import", "tsx", "test/support/scripts/attach-embedded.ts"], {
    env: { ...process.env, EPOCHAL_DATA_DIR: dataDir, DATABASE_URL: "" },
    stdio: ["pipe", "pipe", "inherit"],
  });
  return new Promise((resolve, reject) => {
    let buf = "";
    child.on("error", reject);
    child.stdout.on("data", (d: Buffer) => {
      buf += d.toString();
      if (buf.includes("\n")) {
        const info = JSON.parse(buf.split("\n")[0]) as { url: string; started: boolean };
        resolve({
          ...info,
          release: () =>
            new Promise<void>((ok) => {
              child.on("exit", () => ok());
              child.stdin.end();
            }),
        });
      }
    });
  });
}

describe("embedded default database", () => {
  it("attachEmbeddedDatabase starts a server, keeps data across a restart, and stops when the last client detaches", async () => {
    const dataDir = mkdtempSync(join(tmpdir(), "epochal-embedded-"));
    try {
      const first = await attachEmbeddedDatabase({ dataDir, log: () => undefined });
      expect(first.started).toBe(true);
      const c1 = new pg.Client({ connectionString: first.url });
      await c1.connect();
      await c1.query("create table kept (v text)");
      await c1.query("insert into kept values ('survives restarts')");
      await c1.end();
      const pm1 = readPostmaster(dataDir)!;
      await first.detach();
      expect(isAlive(pm1.pid)).toBe(false);
      expect(readPostmaster(dataDir)).toBeNull();

      const second = await attachEmbeddedDatabase({ dataDir, log: () => undefined });
      expect(second.started).toBe(true);
      const c2 = new pg.Client({ connectionString: second.url });
      await c2.connect();
      const r = await c2.query("select v from kept");
      await c2.end();
      expect(r.rows).toEqual([{ v: "survives restarts" }]);
      await second.detach();
      expect(readPostmaster(dataDir)).toBeNull();
    } finally {
      rmSync(dataDir, { recursive: true, force: true });
    }
  });

  it("two processes share one server: the second joins, and the server stops only when both have gone", async () => {
    const dataDir = mkdtempSync(join(tmpdir(), "epochal-embedded-"));
    try {
      const a = await startHolder(dataDir);
      const b = await startHolder(dataDir);
      expect(a.started).toBe(true);
      expect(b.started).toBe(false);
      expect(new URL(b.url).port).toBe(new URL(a.url).port);
      const pm = readPostmaster(dataDir)!;
      await a.release();
      expect(isAlive(pm.pid)).toBe(true);
      await b.release();
      const deadline = Date.now() + 10_000;
      while (isAlive(pm.pid) && Date.now() < deadline) await new Promise((r) => setTimeout(r, 50));
      expect(isAlive(pm.pid)).toBe(false);
      const stray = spawnSync("pgrep", ["-f", `-D ${join(dataDir, "pg")}`]).stdout.toString().trim();
      expect(stray).toBe("");
    } finally {
      rmSync(dataDir, { recursive: true, force: true });
    }
  });
});
