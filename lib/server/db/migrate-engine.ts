/**
 * The engine side of migrations; runs in a child process of its own (see migrate.ts), because
 * the WebAssembly engine can still call back into freed memory after it is released, which
 * crashes a long-lived host process. Migrations without the native schema engine: Prisma's WebAssembly schema engine, driven
 * through the PostgreSQL driver adapter. `applyMigrations` applies prisma/migrations/<name>/
 * migration.sql in name order and records them in `_prisma_migrations` exactly as
 * `prisma migrate deploy` does (re-running applies nothing). `diffSchemas` writes the SQL that
 * turns one schema into another; `createMigration` uses it with the snapshot of the schema as of
 * the last migration (prisma/migrations/.snapshot.prisma) to make the next migration folder.
 */
import { createRequire } from "node:module";
import { existsSync, mkdirSync, readFileSync, readdirSync, writeFileSync, copyFileSync } from "node:fs";
import { join, resolve } from "node:path";
import { bindMigrationAwareSqlAdapterFactory } from "@prisma/driver-adapter-utils";
import { PrismaPg } from "@prisma/adapter-pg";
import pg from "pg";

type Bg = typeof import("@prisma/schema-engine-wasm/schema_engine_bg");
let bgModule: Promise<Bg> | null = null;

function loadEngineModule(): Promise<Bg> {
  bgModule ??= (async () => {
    const bg = (await import("@prisma/schema-engine-wasm/schema_engine_bg")) as Bg & { __wbg_set_wasm: (w: unknown) => void };
    const req = createRequire(import.meta.url);
    const wasmPath = req.resolve("@prisma/schema-engine-wasm/schema_engine_bg").replace(/\.js$/, ".wasm");
    const { instance } = await WebAssembly.instantiate(readFileSync(wasmPath), { "./schema_engine_bg.js": bg as unknown as WebAssembly.ModuleImports });
    bg.__wbg_set_wasm(instance.exports);
    (instance.exports as { __wbindgen_start: () => void }).__wbindgen_start();
    return bg;
  })();
  return bgModule;
}

export function projectRoot(): string {
  return resolve(process.env.EPOCHAL_ROOT ?? process.cwd());
}

function schemaPath(root: string): string {
  return join(root, "prisma", "schema.prisma");
}

function migrationsDir(root: string): string {
  return join(root, "prisma", "migrations");
}

function migrationList(root: string) {
  const baseDir = migrationsDir(root);
  const lockPath = join(baseDir, "migration_lock.toml");
  const dirs = existsSync(baseDir)
    ? readdirSync(baseDir, { withFileTypes: true })
        .filter((d) => d.isDirectory() && !d.name.startsWith("."))
        .map((d) => d.name)
        .sort((a, b) => a.localeCompare(b))
    : [];
  return {
    baseDir,
    lockfile: { path: "migration_lock.toml", content: existsSync(lockPath) ? readFileSync(lockPath, "utf8") : null },
    shadowDbInitScript: "",
    migrationDirectories: dirs.map((name) => {
      const file = join(baseDir, name, "migration.sql");
      return {
        path: name,
        migrationFile: {
          path: "migration.sql",
          content: existsSync(file) ? ({ tag: "ok", value: readFileSync(file, "utf8") } as const) : ({ tag: "error", value: `missing ${file}` } as const),
        },
      };
    }),
  };
}

async function withEngine<T>(url: string, root: string, fn: (engine: Bg["SchemaEngine"]["prototype"]) => Promise<T>): Promise<T> {
  const bg = await loadEngineModule();
  const schema = readFileSync(schemaPath(root), "utf8");
  // Our own pool, ended afterwards: an idle pool would keep the process alive for its idle timeout.
  const pool = new pg.Pool({ connectionString: url, max: 2 });
  const factory = new PrismaPg(pool);
  const opened: { dispose: () => Promise<void> }[] = [];
  const connect = factory.connect.bind(factory);
  // The engine does not release the connections it takes; track and dispose of them.
  factory.connect = async () => {
    const a = await connect();
    opened.push(a);
    return a;
  };
  const adapter = bindMigrationAwareSqlAdapterFactory(factory);
  const engine = await bg.SchemaEngine.new({ datamodels: [["schema.prisma", schema]] }, () => undefined, adapter);
  try {
    return await fn(engine);
  } finally {
    engine.free();
    for (const a of opened) await a.dispose().catch(() => undefined);
    await pool.end();
  }
}

export type MigrationReport = { applied: string[]; total: number };

/** Applies every pending migration; returns the names applied now and the count on disk. */
export async function applyMigrations(url: string, root = projectRoot()): Promise<MigrationReport> {
  const list = migrationList(root);
  const out: { appliedMigrationNames: string[] } = await withEngine(url, root, (engine) =>
    engine.applyMigrations({ migrationsList: list, filters: { externalTables: [], externalEnums: [] } }),
  );
  return { applied: out.appliedMigrationNames, total: list.migrationDirectories.length };
}

/** SQL that turns schema `fromContent` (null: an empty database) into the current schema.prisma. */
export async function diffSchemas(url: string, fromContent: string | null, root = projectRoot()): Promise<string> {
  const to = readFileSync(schemaPath(root), "utf8");
  return withEngine(url, root, async (engine) => {
    const r = await engine.diff({
      from: fromContent === null ? { tag: "empty" } : { tag: "schemaDatamodel", files: [{ path: "schema.prisma", content: fromContent }] },
      to: { tag: "schemaDatamodel", files: [{ path: "schema.prisma", content: to }] },
      script: true,
      exitCode: null,
      filters: { externalTables: [], externalEnums: [] },
    });
    return (r as { stdout?: string }).stdout ?? "";
  });
}

/** Creates prisma/migrations/<timestamp>_<name>/migration.sql from the schema change since the last migration. */
export async function createMigration(url: string, name: string, root = projectRoot()): Promise<string | null> {
  const dir = migrationsDir(root);
  const snapshot = join(dir, ".snapshot.prisma");
  const from = existsSync(snapshot) ? readFileSync(snapshot, "utf8") : null;
  const sql = await diffSchemas(url, from, root);
  if (!/\b(CREATE|ALTER|DROP)\b/.test(sql)) return null;
  const stamp = new Date().toISOString().replace(/\D/g, "").slice(0, 14);
  const folder = join(dir, `${stamp}_${name.replace(/[^a-z0-9_]/gi, "_").toLowerCase()}`);
  mkdirSync(folder, { recursive: true });
  writeFileSync(join(folder, "migration.sql"), sql);
  if (!existsSync(join(dir, "migration_lock.toml")))
    writeFileSync(join(dir, "migration_lock.toml"), '# Please do not edit this file manually\n# It should be added in your version-control system (e.g., Git)\nprovider = "postgresql"\n');
  copyFileSync(schemaPath(root), snapshot);
  return folder;
}

// Child-process entry: `node --import tsx migrate-engine.ts <apply|diff|create> URL ROOT [NAME]`,
// printing one JSON line with the result.
if (process.argv[1] && import.meta.url === new URL(`file://${resolve(process.argv[1])}`).href) {
  const [cmd, url, root, name] = process.argv.slice(2);
  const job =
    cmd === "apply" ? applyMigrations(url, root) : cmd === "create" ? createMigration(url, name, root) : Promise.reject(new Error(`unknown command ${cmd}`));
  job.then(
    (r) => {
      process.stdout.write(JSON.stringify({ ok: true, result: r }) + "\n");
      process.exit(0);
    },
    (err: unknown) => {
      process.stdout.write(JSON.stringify({ ok: false, message: String((err as Error)?.message ?? err) }) + "\n");
      process.exit(1);
    },
  );
}
