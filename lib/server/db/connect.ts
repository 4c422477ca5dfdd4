/**
 * Where the database is: `DATABASE_URL` when set (a production or test server), otherwise the
 * embedded default (started or joined, see embedded.ts). Command-line tools call
 * `openDatabaseUrl`, which attaches to the embedded server; `detach` releases it.
 */
import { attachEmbeddedDatabase } from "./embedded.ts";

export type DatabaseTarget = { url: string; embedded: boolean; detach: () => Promise<void> };

export async function openDatabaseUrl(log?: (m: string) => void): Promise<DatabaseTarget> {
  const url = process.env.DATABASE_URL;
  if (url) return { url, embedded: false, detach: async () => undefined };
  const h = await attachEmbeddedDatabase({ log });
  process.env.DATABASE_URL = h.url;
  return { url: h.url, embedded: true, detach: h.detach };
}
