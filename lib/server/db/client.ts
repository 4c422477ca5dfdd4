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
    adapter: new PrismaPg({ connectionString: url, max }),
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
