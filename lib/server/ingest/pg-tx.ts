/**
 * A plain `pg` transaction for the ingest hot path. Prisma 7 routes even raw statements through its
 * query compiler (WebAssembly), which copies every parameter in and out: with the megabyte-sized
 * array literals of a bulk insert that cost about 160 ms of CPU per 2,000-point epoch (measured with
 * node --cpu-prof, test/bench/ingest.ts). Ingest therefore writes through its own small pool on the
 * same DATABASE_URL, in one BEGIN … COMMIT, with the same SQL it sent through Prisma before.
 *
 * The pool lives on globalThis (one per URL and process, shared by every bundle copy) and lets the
 * process exit when idle.
 */
import pg from "pg";
import { databaseUrl, SESSION_OPTIONS } from "../db/client.ts";

/** The one method the ingest and results code needs: a parameterised statement, rows back. */
export interface Sql {
  query<R>(text: string, values?: readonly unknown[]): Promise<R[]>;
  /** `COPY … FROM STDIN` with `data` as its whole input (lib/formats/pg-copy-binary.ts writes binary streams); answers the rows copied. */
  copyFrom(text: string, data: Uint8Array, onSent?: () => void): Promise<number>;
  /**
   * `COPY … FROM STDIN` whose input `produce` writes with `send` as it makes it, once the server is
   * ready for it (the server stores each part while the next is made). What `produce` throws aborts
   * the COPY (CopyFail) and is thrown from here.
   */
  copyFromProducer(text: string, produce: (send: (chunk: Uint8Array) => void) => void): Promise<number>;
}

const KEY = Symbol.for("epochal.ingest.pgPools");
type Holder = { [KEY]?: Map<string, pg.Pool> };

function pool(url: string): pg.Pool {
  const h = globalThis as Holder;
  h[KEY] ??= new Map();
  let p = h[KEY].get(url);
  if (!p) {
    const max = Number(process.env.EPOCHAL_INGEST_POOL ?? 4);
    p = new pg.Pool({ connectionString: url, options: SESSION_OPTIONS, max: Number.isFinite(max) && max > 0 ? max : 4, idleTimeoutMillis: 10_000, allowExitOnIdle: true });
    // An idle client that loses its server (restart) must not crash the process; the next query reconnects.
    p.on("error", (err) => console.error("epochal: an idle ingest database connection failed", err.message));
    h[KEY].set(url, p);
  }
  return p;
}

/** The key the results caches use to tell databases apart (ids repeat across databases). */
export function currentDatabaseKey(): string {
  return databaseUrl();
}

/**
 * Runs `fn` in one transaction on DATABASE_URL; commits when it resolves, rolls back when it throws
 * (and rethrows). `timeoutMs` bounds every statement (statement_timeout).
 */
export async function withPgTransaction<T>(fn: (sql: Sql) => Promise<T>, opts: { timeoutMs?: number } = {}): Promise<T> {
  const client = await pool(databaseUrl()).connect();
  const copyFromProducer = (text: string, produce: (send: (chunk: Uint8Array) => void) => void): Promise<number> =>
    new Promise((resolve, reject) => {
      const q: ProducedCopyInQuery = new ProducedCopyInQuery(text, produce, (err, res) => (q.failure ? reject(q.failure.error) : err ? reject(err) : resolve(res?.rowCount ?? 0)));
      client.query(q);
    });
  const sql: Sql = {
    query: async <R>(text: string, values?: readonly unknown[]): Promise<R[]> => (await client.query(text, values as unknown[] | undefined)).rows as R[],
    // The whole input at once, in parts of 1 MiB; `onSent` runs once it is handed to the socket,
    // deferred past the protocol callback (the server is storing it while the caller goes on).
    copyFrom: (text: string, data: Uint8Array, onSent?: () => void): Promise<number> =>
      copyFromProducer(text, (send) => {
        const CHUNK = 1 << 20;
        for (let at = 0; at < data.byteLength; at += CHUNK) send(data.subarray(at, Math.min(data.byteLength, at + CHUNK)));
        if (onSent) setImmediate(onSent);
      }),
    copyFromProducer,
  };
  let broken = false;
  try {
    await client.query("BEGIN");
    if (opts.timeoutMs) await client.query(`SET LOCAL statement_timeout = ${Math.round(opts.timeoutMs)}`);
    const result = await fn(sql);
    await client.query("COMMIT");
    return result;
  } catch (err) {
    try {
      await client.query("ROLLBACK");
    } catch {
      broken = true;
    }
    throw err;
  } finally {
    client.release(broken);
  }
}

/** One statement outside any transaction, on the same pool (reads of committed rows on hot paths). */
export async function pgQuery<R>(text: string, values?: readonly unknown[]): Promise<R[]> {
  return (await pool(databaseUrl()).query(text, values as unknown[] | undefined)).rows as R[];
}

/** Streams what a producer writes as the data of one `COPY … FROM STDIN`, as it writes it (pg's Query refuses a COPY IN without a stream). */
class ProducedCopyInQuery extends pg.Query {
  failure: { error: unknown } | null = null;
  constructor(
    text: string,
    private readonly produce: (send: (chunk: Uint8Array) => void) => void,
    callback: (err: Error | undefined, result?: { rowCount: number | null }) => void,
  ) {
    super(text, callback as never);
  }
  handleCopyInResponse(connection: { sendCopyFromChunk(chunk: Buffer): void; endCopyFrom(): void; sendCopyFail(msg: string): void }): void {
    // Runs inside the connection's protocol callback: nothing may escape it.
    try {
      this.produce((chunk) => connection.sendCopyFromChunk(Buffer.from(chunk.buffer, chunk.byteOffset, chunk.byteLength)));
      connection.endCopyFrom();
    } catch (error) {
      this.failure = { error };
      connection.sendCopyFail(error instanceof Error ? error.message : String(error));
    }
  }
}

/** Collects the CopyData messages of a `COPY … TO STDOUT` (pg's Query discards them). */
class CopyOutQuery extends pg.Query {
  readonly chunks: Buffer[] = [];
  handleCopyData(msg: { chunk: Buffer }): void {
    // The chunk is a view into the protocol parser's buffer, which later messages may overwrite.
    this.chunks.push(Buffer.from(msg.chunk));
  }
}

/**
 * The output of one `COPY (…) TO STDOUT` statement on the same pool, as one byte string. With
 * `(FORMAT binary)` large byte strings arrive as they are: no hex text for PostgreSQL to write and
 * for pg to decode (see lib/formats/pg-copy-binary.ts). COPY takes no parameters: the caller puts
 * only checked literals into `text`.
 */
export async function pgCopyOut(text: string): Promise<Uint8Array> {
  const client = await pool(databaseUrl()).connect();
  let broken = false;
  try {
    const chunks = await new Promise<Buffer[]>((resolve, reject) => {
      const q: CopyOutQuery = new CopyOutQuery(text, (err: Error | undefined) => (err ? reject(err) : resolve(q.chunks)));
      client.query(q);
    });
    return chunks.length === 1 ? chunks[0] : Buffer.concat(chunks);
  } catch (err) {
    broken = !(err instanceof pg.DatabaseError);
    throw err;
  } finally {
    client.release(broken);
  }
}

/** Closes the pools of this process (tests, shutdown). */
export async function closeIngestPools(): Promise<void> {
  const h = globalThis as Holder;
  const pools = [...(h[KEY]?.values() ?? [])];
  h[KEY]?.clear();
  await Promise.all(pools.map((p) => p.end()));
}
