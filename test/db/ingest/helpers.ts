/** Shared helpers of the ingest database tests: a site with tokens, and in-process calls of the routes. */
import { getDb } from "../../../lib/server/db/client.ts";
import { hashSecret, newSecret } from "../../../lib/server/auth/secrets.ts";
import { uniqueSlug } from "../../support/unique.ts";
import { POST as postEpochs, GET as getEpochs } from "../../../app/api/v1/sites/[slug]/epochs/route.ts";
import { GET as getPoints } from "../../../app/api/v1/sites/[slug]/points/route.ts";

export interface TestSite {
  id: number;
  slug: string;
  ingestToken: string;
  readToken: string;
}

export async function makeToken(siteId: number, scope: "ingest" | "read"): Promise<string> {
  const secret = newSecret("ept");
  await getDb().apiToken.create({ data: { siteId, scope, tokenHash: hashSecret(secret), prefix: secret.slice(0, 10), name: `test ${scope}` } });
  return secret;
}

export async function makeSite(data: { refuseUnknownPoints?: boolean; originLatDeg?: number; originLonDeg?: number; originHeightM?: number; sigmaHM?: number; sigmaVM?: number } = {}): Promise<TestSite> {
  const slug = uniqueSlug("ing");
  const site = await getDb().site.create({ data: { slug, name: slug, timeZone: "Europe/Zurich", ...data } });
  return { id: site.id, slug, ingestToken: await makeToken(site.id, "ingest"), readToken: await makeToken(site.id, "read") };
}

export const CT = { csv: "text/csv", json: "application/json", geojson: "application/geo+json" } as const;

export async function post(
  slug: string,
  body: string | ReadableStream<Uint8Array>,
  opts: { token?: string | null; type?: string | null; query?: string; headers?: Record<string, string> } = {},
): Promise<{ status: number; json: Record<string, unknown>; serverTiming: string | null }> {
  const headers: Record<string, string> = { ...(opts.headers ?? {}) };
  if (opts.token) headers.authorization = `Bearer ${opts.token}`;
  if (opts.type !== null) headers["content-type"] = opts.type ?? CT.csv;
  const init: RequestInit & { duplex?: "half" } = { method: "POST", headers, body };
  if (typeof body !== "string") init.duplex = "half";
  const req = new Request(`http://localhost/api/v1/sites/${slug}/epochs${opts.query ?? ""}`, init);
  const res = await postEpochs(req, { params: Promise.resolve({ slug }) });
  return { status: res.status, json: (await res.json()) as Record<string, unknown>, serverTiming: res.headers.get("server-timing") };
}

export async function get(path: "epochs" | "points", slug: string, token: string, query = ""): Promise<{ status: number; json: Record<string, unknown> }> {
  const req = new Request(`http://localhost/api/v1/sites/${slug}/${path}${query}`, { headers: { authorization: `Bearer ${token}` } });
  const res = await (path === "epochs" ? getEpochs : getPoints)(req, { params: Promise.resolve({ slug }) });
  return { status: res.status, json: (await res.json()) as Record<string, unknown> };
}

/** An epoch CSV: one row per point, coordinates offset by `shiftM` (east). */
export function epochCsv(time: string | null, points: [string, number, number, number][], shiftM = 0): string {
  const head = time === null ? "point,east,north,height" : "point,east,north,height,time";
  return [head, ...points.map(([p, e, n, h]) => `${p},${e + shiftM},${n},${h}${time === null ? "" : `,${time}`}`)].join("\n") + "\n";
}

export const GRID: [string, number, number, number][] = [
  ["P1", 1000, 2000, 100],
  ["P2", 1010, 2000, 100.5],
  ["P3", 1005, 2008.66, 101],
  ["P4", 1015, 2008.66, 99.8],
];

export async function counts(siteId: number): Promise<{ epochs: number; observations: number; points: number; audits: number; results: number }> {
  const db = getDb();
  const [e, o, p, a, r] = await Promise.all([
    db.epoch.count({ where: { siteId } }),
    db.observation.count({ where: { epoch: { siteId } } }),
    db.point.count({ where: { siteId } }),
    db.auditEntry.count({ where: { siteId } }),
    db.element.findMany({ where: { siteId }, select: { id: true } }).then((els) => db.elementResult.count({ where: { elementId: { in: els.map((x) => x.id) } } })),
  ]);
  return { epochs: e, observations: o, points: p, audits: a, results: r };
}
