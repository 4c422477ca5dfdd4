/**
 * The one Prisma client. Connects to DATABASE_URL, or to the embedded default database when it
 * is already running from the data folder (the `epochal serve` launcher starts it and sets
 * DATABASE_URL for the Next.js server it spawns).
 */
import { PrismaPg } from "@prisma/adapter-pg";
import { PrismaClient } from "./generated/client.ts";
import { runningEmbeddedUrl } from "./embedded.ts";
import { AppError } from "../errors.ts";

export type Db = InstanceType<typeof PrismaClient>;

const globalKey = Symbol.for("epochal.db");
type Holder = { [globalKey]?: { url: string; client: Db } };

export function databaseUrl(): string {
  const url = process.env.DATABASE_URL || runningEmbeddedUrl();
  if (!url) throw new AppError("unavailable", "No database: set DATABASE_URL or start Epochal with `npm start` (embedded database).");
  return url;
}

/**
 * Session settings of every connection the application opens (Prisma's pool and the plain `pg` pool
 * of lib/server/ingest/pg-tx.ts), sent in the startup packet. `jit=off`: PostgreSQL's JIT compiles a
 * query whose estimated cost passes jit_above_cost (100,000 by default), which the ingest's
 * classification query does once a site holds a few thousand epochs (its estimate counts the
 * observations per epoch): 150–200 ms of LLVM compilation for a query that runs in 15 ms, measured on
 * PostgreSQL 15 with EXPLAIN ANALYZE (the "JIT:" lines). The application's queries are short; none
 * gains from JIT. Options in DATABASE_URL itself take precedence (node-postgres reads them last).
 */
export const SESSION_OPTIONS = "-c jit=off";

/** The shared client (one per process, kept across hot reloads). */
export function getDb(): Db {
  const holder = globalThis as Holder;
  const url = databaseUrl();
  const cur = holder[globalKey];
  if (cur && cur.url === url) return cur.client;
  const max = Number(process.env.EPOCHAL_DB_POOL ?? 10);
  // Interactive transactions: Prisma's 5 s default is too short for a large backfill or a busy
  // machine; a transaction that runs out of time is rolled back whole, so a generous limit is safe.
  const client = new PrismaClient({
    adapter: new PrismaPg({ connectionString: url, max, options: SESSION_OPTIONS }),
    transactionOptions: { timeout: Number(process.env.EPOCHAL_TX_TIMEOUT_MS ?? 120_000), maxWait: 60_000 },
  });
  holder[globalKey] = { url, client };
  return client;
}

export async function closeDb(): Promise<void> {
  const holder = globalThis as Holder;
  const cur = holder[globalKey];
  holder[globalKey] = undefined;
  if (cur) await cur.client.$disconnect();
}
