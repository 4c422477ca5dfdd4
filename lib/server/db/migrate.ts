/**
 * Applying and creating migrations. The work happens in a short-lived child process running
 * Prisma's WebAssembly schema engine (migrate-engine.ts): the engine can call back into freed
 * memory some time after it is released, which would crash a long-lived host (the server
 * launcher, the test runner). A child that exits when done cannot be hurt by that.
 */
import { spawn } from "node:child_process";
import { resolve, dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

export type MigrationReport = { applied: string[]; total: number };

export function projectRoot(): string {
  return resolve(process.env.EPOCHAL_ROOT ?? process.cwd());
}

const ENGINE = join(dirname(fileURLToPath(import.meta.url)), "migrate-engine.ts");

function runEngine<T>(args: string[], root: string): Promise<T> {
  return new Promise((ok, fail) => {
    const child = spawn(process.execPath, ["--import", "tsx", ENGINE, ...args], { cwd: root, stdio: ["ignore", "pipe", "pipe"] });
    let out = "";
    let err = "";
    child.stdout.on("data", (d: Buffer) => (out += d.toString()));
    child.stderr.on("data", (d: Buffer) => (err += d.toString()));
    child.on("error", fail);
    child.on("exit", (code) => {
      const line = out.trim().split("\n").pop() ?? "";
      try {
        const r = JSON.parse(line) as { ok: boolean; result?: T; message?: string };
        if (r.ok) ok(r.result as T);
        else fail(new Error(`migrations: ${r.message}`));
      } catch {
        fail(new Error(`migrations: the engine process exited with ${code}: ${err.trim().split("\n").slice(-5).join("\n")}`));
      }
    });
  });
}

/** Applies every pending migration in prisma/migrations; returns the names applied now and the count on disk. */
export function applyMigrations(url: string, root = projectRoot()): Promise<MigrationReport> {
  return runEngine<MigrationReport>(["apply", url, root], root);
}

/** Writes prisma/migrations/<stamp>_<name>/migration.sql from the schema change since the last migration (null: no change). */
export function createMigration(url: string, name: string, root = projectRoot()): Promise<string | null> {
  return runEngine<string | null>(["create", url, root, name], root);
}
