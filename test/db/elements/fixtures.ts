/**
 * Fixtures of the element tests: a site with points and epochs written straight to the database
 * (the ingest service is not under test here), users with a role and a session, and calls of the
 * route handlers in-process with a session cookie and a same-origin header.
 */
import { getDb } from "../../../lib/server/db/client.ts";
import { hashSecret, newSecret, SESSION_COOKIE } from "../../../lib/server/auth/secrets.ts";
import type { Role } from "../../../lib/server/auth/permissions.ts";
import { uniqueSlug } from "../../support/unique.ts";

export type Coord = { east: number; north: number; height?: number };
export type EpochSpec = { time: string; points: Record<string, Coord> };

export const SIGMA_H = 0.001;
export const SIGMA_V = 0.0015;

export async function makeSite(opts: { timeZone?: string; points: string[]; groups?: Record<string, string> }): Promise<{ id: number; slug: string; pointIds: Map<string, number> }> {
  const db = getDb();
  const site = await db.site.create({ data: { slug: uniqueSlug("el"), name: "Element test site", timeZone: opts.timeZone ?? "Europe/Zurich" } });
  const pointIds = new Map<string, number>();
  for (const code of opts.points) {
    const p = await db.point.create({ data: { siteId: site.id, code, group: opts.groups?.[code] ?? null } });
    pointIds.set(code, p.id);
  }
  return { id: site.id, slug: site.slug, pointIds };
}

let hashN = 0;
export async function addEpochs(site: { id: number; pointIds: Map<string, number> }, epochs: EpochSpec[]): Promise<number[]> {
  const db = getDb();
  const ids: number[] = [];
  for (const ep of epochs) {
    const e = await db.epoch.create({ data: { siteId: site.id, time: new Date(ep.time), contentHash: `test-${process.pid}-${++hashN}` } });
    await db.observation.createMany({
      data: Object.entries(ep.points).map(([code, c]) => ({
        epochId: e.id,
        pointId: site.pointIds.get(code) as number,
        east: c.east,
        north: c.north,
        height: c.height ?? 0,
        sigmaEast: SIGMA_H,
        sigmaNorth: SIGMA_H,
        sigmaHeight: SIGMA_V,
      })),
    });
    ids.push(e.id);
  }
  return ids;
}

/** A user with `role` on the site (or a global administrator) and a live session; returns the cookie. */
export async function sessionFor(siteId: number, role: Role | "global-admin"): Promise<string> {
  const db = getDb();
  const u = await db.user.create({ data: { email: `${uniqueSlug("u")}@example.test`, name: "Tester", passwordHash: "x", isAdmin: role === "global-admin" } });
  if (role !== "global-admin") await db.membership.create({ data: { userId: u.id, siteId, role } });
  const secret = newSecret("eps");
  await db.session.create({ data: { id: hashSecret(secret), userId: u.id, expiresAt: new Date(Date.now() + 3600_000) } });
  return `${SESSION_COOKIE}=${secret}`;
}

type Handler<P> = (req: Request, ctx: { params: Promise<P> }) => Promise<Response>;

/** Calls a route handler as Next.js would, with the cookie and a same-origin header. */
export async function call<P>(
  handler: Handler<P>,
  opts: { method: string; path: string; params: P; cookie: string; body?: unknown; query?: Record<string, string | number> },
): Promise<{ status: number; json: Record<string, unknown> }> {
  const url = new URL(`http://epochal.test${opts.path}`);
  for (const [k, v] of Object.entries(opts.query ?? {})) url.searchParams.set(k, String(v));
  const headers = new Headers({ host: url.host, origin: url.origin, cookie: opts.cookie });
  if (opts.body !== undefined) headers.set("content-type", "application/json");
  const req = new Request(url, { method: opts.method, headers, body: opts.body === undefined ? undefined : JSON.stringify(opts.body) });
  const res = await handler(req, { params: Promise.resolve(opts.params) });
  const text = await res.text();
  return { status: res.status, json: text ? (JSON.parse(text) as Record<string, unknown>) : {} };
}

export function hoursAfter(iso: string, h: number): string {
  return new Date(Date.parse(iso) + h * 3600_000).toISOString();
}
