/**
 * Rows the reliability tests need, written straight into the server's database with `pg` (sites,
 * tokens, users with a cheap bcrypt hash, elements), epoch bodies, HTTP helpers, and the SQL
 * checks that count what was stored.
 */
import pg from "pg";
import bcrypt from "bcryptjs";
import { hashSecret, newSecret, SESSION_COOKIE } from "../../../lib/server/auth/secrets.ts";
import { uniqueSlug } from "../../support/unique.ts";

export { uniqueSlug };

export function openPool(url: string): pg.Pool {
  const pool = new pg.Pool({ connectionString: url, max: 4 });
  // A private cluster stopped under an idle client must not crash the test process.
  pool.on("error", () => undefined);
  return pool;
}

export type SiteRow = { id: number; slug: string };

export async function createSite(pool: pg.Pool, opts: { slug?: string; name?: string } = {}): Promise<SiteRow> {
  const slug = opts.slug ?? uniqueSlug("rel");
  const r = await pool.query<{ id: number }>(`insert into "Site"(slug, name, "timeZone") values ($1, $2, 'Europe/Zurich') returning id`, [slug, opts.name ?? `Reliability ${slug}`]);
  return { id: r.rows[0].id, slug };
}

export async function createToken(pool: pg.Pool, siteId: number, scope: "read" | "ingest" | "admin"): Promise<string> {
  const secret = newSecret("ept");
  await pool.query(`insert into "ApiToken"("siteId", scope, "tokenHash", prefix, name) values ($1, $2, $3, $4, 'reliability')`, [siteId, scope, hashSecret(secret), secret.slice(0, 12)]);
  return secret;
}

/** A bcrypt hash of cost 4: verifying it costs a millisecond, so hundreds of sign-ins stay quick. */
export const cheapHash = (password: string) => bcrypt.hash(password, 4);

export async function createUser(pool: pg.Pool, opts: { email: string; passwordHash: string; isAdmin?: boolean; name?: string }): Promise<number> {
  const r = await pool.query<{ id: number }>(`insert into "User"(email, name, "passwordHash", "isAdmin") values ($1, $2, $3, $4) returning id`, [
    opts.email,
    opts.name ?? "Reliability user",
    opts.passwordHash,
    opts.isAdmin ?? false,
  ]);
  return r.rows[0].id;
}

export async function addMembership(pool: pg.Pool, userId: number, siteId: number, role: string): Promise<void> {
  await pool.query(`insert into "Membership"("userId", "siteId", role) values ($1, $2, $3)`, [userId, siteId, role]);
}

/** Signs in over HTTP (POST /api/v1/session with an Origin header) and returns the session cookie as a browser would send it. */
export async function signIn(baseUrl: string, email: string, password: string): Promise<string> {
  const r = await fetch(`${baseUrl}/api/v1/session`, {
    method: "POST",
    headers: { "content-type": "application/json", origin: baseUrl },
    body: JSON.stringify({ email, password }),
  });
  const text = await r.text();
  if (r.status !== 200) throw new Error(`sign-in of ${email} answered ${r.status}: ${text.slice(0, 300)}`);
  const set = r.headers.getSetCookie().find((c) => c.startsWith(`${SESSION_COOKIE}=`));
  if (!set) throw new Error("sign-in set no session cookie");
  return set.split(";")[0];
}

// ---------------------------------------------------------------------------------------------
// Epoch bodies

export type Pt = { code: string; east: number; north: number; height: number };

/** A grid of `n` points about (1000, 2000), 10 m apart. */
export function gridPoints(n: number, prefix = "P"): Pt[] {
  const pts: Pt[] = [];
  const side = Math.ceil(Math.sqrt(n));
  for (let i = 0; i < n; i++) pts.push({ code: `${prefix}${i + 1}`, east: 1000 + 10 * (i % side), north: 2000 + 10 * Math.floor(i / side), height: 100 + (i % 7) * 0.1 });
  return pts;
}

/** Epoch JSON with every point shifted east by `shiftM` (a new content hash for each shift). */
export function epochJson(time: string, pts: readonly Pt[], shiftM = 0, stretchE = 0): string {
  return JSON.stringify({
    time,
    observations: pts.map((p) => ({ point: p.code, east: +(p.east + shiftM + (p.east - 1000) * stretchE).toFixed(6), north: p.north, height: p.height })),
  });
}

export const T0 = Date.UTC(2025, 0, 1);
export const isoAt = (ms: number) => new Date(ms).toISOString();

export type PostResult = { status: number; body: string; ms: number; error?: string };

/** POST one epoch (JSON) with a bearer token; a network error is status 0. */
export async function postEpoch(baseUrl: string, slug: string, token: string, body: string, query = "", timeoutMs = 30_000): Promise<PostResult> {
  const t0 = performance.now();
  try {
    const r = await fetch(`${baseUrl}/api/v1/sites/${slug}/epochs${query}`, {
      method: "POST",
      headers: { authorization: `Bearer ${token}`, "content-type": "application/json" },
      body,
      signal: AbortSignal.timeout(timeoutMs),
    });
    const text = await r.text();
    return { status: r.status, body: text, ms: performance.now() - t0 };
  } catch (err) {
    return { status: 0, body: "", ms: performance.now() - t0, error: String((err as Error).cause ?? err) };
  }
}

// ---------------------------------------------------------------------------------------------
// SQL checks

export type EpochRow = { id: number; time: Date; revision: number; isCurrent: boolean; observations: number; results: number; contentHash: string };

/** Every Epoch row of a site with its observation and result counts. */
export async function epochRows(pool: pg.Pool, siteId: number): Promise<EpochRow[]> {
  const r = await pool.query<EpochRow>(
    `select e.id, e.time, e.revision, e."isCurrent", e."contentHash",
            (select count(*) from "Observation" o where o."epochId" = e.id)::int as observations,
            (select count(*) from "ElementResult" x where x."epochId" = e.id)::int as results
       from "Epoch" e where e."siteId" = $1 order by e.time, e.revision`,
    [siteId],
  );
  return r.rows;
}

export async function siteCounts(pool: pg.Pool, siteId: number): Promise<{ epochs: number; observations: number; points: number; results: number; audit: number }> {
  const r = await pool.query<{ epochs: number; observations: number; points: number; results: number; audit: number }>(
    `select (select count(*) from "Epoch" where "siteId" = $1)::int as epochs,
            (select count(*) from "Observation" o join "Epoch" e on e.id = o."epochId" where e."siteId" = $1)::int as observations,
            (select count(*) from "Point" where "siteId" = $1)::int as points,
            (select count(*) from "ElementResult" x join "Epoch" e on e.id = x."epochId" where e."siteId" = $1)::int as results,
            (select count(*) from "AuditEntry" where "siteId" = $1 and action like 'epoch.%')::int as audit`,
    [siteId],
  );
  return r.rows[0];
}

/** Whole-database counts, for "nothing was written anywhere". */
export async function globalCounts(pool: pg.Pool): Promise<Record<string, number>> {
  const r = await pool.query<Record<string, number>>(
    `select (select count(*) from "Epoch")::int as epochs, (select count(*) from "Observation")::int as observations,
            (select count(*) from "Point")::int as points, (select count(*) from "ElementResult")::int as results`,
  );
  return r.rows[0];
}

/** The p-th percentile (0–100) of a list of numbers, nearest-rank. */
export function percentile(values: readonly number[], p: number): number {
  if (values.length === 0) return NaN;
  const s = [...values].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.max(0, Math.ceil((p / 100) * s.length) - 1))];
}

/** Prints one block of figures, prefixed so they can be grepped from the run's output. */
export function printFigures(title: string, figures: Record<string, unknown>): void {
  const lines = Object.entries(figures).map(([k, v]) => `  ${k}: ${typeof v === "number" ? (Number.isInteger(v) ? v : v.toFixed(1)) : JSON.stringify(v)}`);
  console.log(`\n[reliability] ${title}\n${lines.join("\n")}\n`);
}
