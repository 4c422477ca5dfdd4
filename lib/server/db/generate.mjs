// Runs `prisma generate` offline. The Prisma CLI insists on locating a native schema-engine
// binary before generating, and that binary cannot be downloaded here; generation never uses it,
// so a stub that exits 1 satisfies the lookup (a stub that exits 0 would let `migrate` pretend).
import { spawnSync } from "node:child_process";
import { mkdirSync, writeFileSync, chmodSync, existsSync } from "node:fs";
import { join, dirname } from "node:path";
import { fileURLToPath } from "node:url";

const root = join(dirname(fileURLToPath(import.meta.url)), "..", "..", "..");
const stubDir = join(root, "node_modules", ".epochal");
const stub = join(stubDir, "schema-engine-stub");
if (!existsSync(stub)) {
  mkdirSync(stubDir, { recursive: true });
  writeFileSync(stub, "#!/bin/sh\necho 'epochal: the native schema engine is not used; migrations run through the WebAssembly engine (npm run db:migrate)' >&2\nexit 1\n");
  chmodSync(stub, 0o755);
}
const env = { ...process.env, PRISMA_SCHEMA_ENGINE_BINARY: process.env.PRISMA_SCHEMA_ENGINE_BINARY ?? stub, PRISMA_HIDE_UPDATE_MESSAGE: "1", CHECKPOINT_DISABLE: "1" };
const r = spawnSync(process.execPath, [join(root, "node_modules", "prisma", "build", "index.js"), "generate"], { cwd: root, env, stdio: "inherit" });
process.exit(r.status ?? 1);
