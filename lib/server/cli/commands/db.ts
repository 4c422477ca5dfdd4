import { openDatabaseUrl } from "../../db/connect.ts";
import { applyMigrations, createMigration } from "../../db/migrate.ts";
import { stopEmbeddedDatabase, defaultDataDir, readPostmaster } from "../../db/embedded.ts";

export const help = `Usage: epochal db <migrate|new-migration NAME|status|stop>

  migrate              Apply pending migrations from prisma/migrations (also done at every start).
  new-migration NAME   After editing prisma/schema.prisma: write the next migration folder
                       from the change since the last one (uses prisma/migrations/.snapshot.prisma).
  status               Show where the database is and how many migrations are applied.
  stop                 Stop the embedded database server (when DATABASE_URL is unset).

Uses DATABASE_URL when set; otherwise the embedded database in .epochal-data/ (EPOCHAL_DATA_DIR).`;

export async function run(args: string[]): Promise<number> {
  const [sub, name] = args;
  if (sub === "stop") {
    const dir = defaultDataDir();
    const was = readPostmaster(dir);
    if (!was) {
      console.log(`embedded database in ${dir} is not running`);
      return 0;
    }
    const ok = await stopEmbeddedDatabase(dir);
    console.log(ok ? `embedded database (pid ${was.pid}) stopped` : `embedded database (pid ${was.pid}) did not stop within 30 s`);
    return ok ? 0 : 1;
  }
  if (sub !== "migrate" && sub !== "new-migration" && sub !== "status") {
    console.error(help);
    return 2;
  }
  if (sub === "new-migration" && !name) {
    console.error("epochal db new-migration: give the migration a NAME, e.g. add_point_notes");
    return 2;
  }
  const target = await openDatabaseUrl();
  try {
    if (sub === "new-migration") {
      const folder = await createMigration(target.url, name!);
      console.log(folder ? `wrote ${folder}/migration.sql — review it, then run: npm run db:migrate` : "no schema change since the last migration");
      return 0;
    }
    const r = await applyMigrations(target.url);
    if (sub === "migrate") console.log(r.applied.length ? `applied ${r.applied.length} migration(s): ${r.applied.join(", ")}` : `database is up to date (${r.total} migrations)`);
    else console.log(`database: ${target.embedded ? "embedded" : "DATABASE_URL"}; ${r.total} migrations on disk, ${r.applied.length} were pending and are now applied`);
    return 0;
  } finally {
    await target.detach();
  }
}
