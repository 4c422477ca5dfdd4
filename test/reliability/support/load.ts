/**
 * The load scenario: C concurrent clients (autocannon connections, one API token each) post N
 * epochs each to one site, in a fixed per-client sequence of request kinds:
 *
 *   new       a fresh epoch at a time only this client uses             → 201, outcome "created"
 *   dup       the client's latest epoch again, same content             → 200, outcome "unchanged"
 *   revise    that epoch with new coordinates and ?revise=true          → 201, outcome "revised"
 *   conflict  that epoch with other coordinates and no ?revise          → 409, nothing stored
 *   shared    an epoch that every client posts with the same content    → 201 for exactly one client, 200 for the others
 *
 * Afterwards SQL counts every Epoch row per time and revision and the observations of each row.
 */
import autocannon, { type AutocannonRequest } from "autocannon";
import type pg from "pg";
import { createSite, createToken, epochJson, epochRows, gridPoints, isoAt, percentile, T0, type Pt } from "./fixtures.ts";

type Kind = "new" | "dup" | "revise" | "conflict" | "shared";
const PATTERN: Kind[] = ["new", "new", "dup", "shared", "new", "revise", "conflict", "new", "dup", "revise"];

type Planned = { kind: Kind; time: string; body: string; query: string };
type Seen = { client: number; index: number; kind: Kind; time: string; status: number; outcome: string | null; code: string | null };

export type LoadFigures = {
  clients: number;
  perClient: number;
  requests: number;
  durationS: number;
  throughputPerS: number;
  p50Ms: number;
  p95Ms: number;
  p99Ms: number;
  maxMs: number;
  byKind: Record<string, number>;
  wrongResponses: number;
  networkErrors: number;
  epochRows: number;
  observations: number;
  lost: number;
  duplicated: number;
};

function planFor(client: number, n: number, pts: readonly Pt[]): Planned[] {
  const out: Planned[] = [];
  const mine: { time: string; shift: number }[] = [];
  let shared = 0;
  for (let j = 0; j < n; j++) {
    let kind = PATTERN[j % PATTERN.length];
    if (kind !== "new" && kind !== "shared" && mine.length === 0) kind = "new";
    if (kind === "new") {
      const time = isoAt(T0 + (client * 10_000 + mine.length) * 60_000);
      mine.push({ time, shift: 0 });
      out.push({ kind, time, body: epochJson(time, pts, 0), query: "" });
    } else if (kind === "shared") {
      const time = isoAt(T0 - (shared + 1) * 3_600_000);
      shared += 1;
      out.push({ kind, time, body: epochJson(time, pts, 0.5), query: "" });
    } else {
      const last = mine[mine.length - 1];
      if (kind === "dup") out.push({ kind, time: last.time, body: epochJson(last.time, pts, last.shift), query: "" });
      else if (kind === "revise") {
        last.shift += 0.001;
        out.push({ kind, time: last.time, body: epochJson(last.time, pts, last.shift), query: "?revise=true" });
      } else out.push({ kind, time: last.time, body: epochJson(last.time, pts, last.shift + 0.25), query: "" });
    }
  }
  return out;
}

/** Expected final state per epoch time: number of revisions stored. */
function expectedRevisions(plans: Planned[][]): Map<string, number> {
  const m = new Map<string, number>();
  for (const plan of plans)
    for (const p of plan) {
      if (p.kind === "new" || p.kind === "shared") m.set(p.time, Math.max(m.get(p.time) ?? 0, 1));
      else if (p.kind === "revise") m.set(p.time, (m.get(p.time) ?? 1) + 1);
    }
  return m;
}

export async function runLoad(opts: { baseUrl: string; pool: pg.Pool; clients: number; perClient: number; points?: number }): Promise<{ figures: LoadFigures; problems: string[] }> {
  const pts = gridPoints(opts.points ?? 12);
  const site = await createSite(opts.pool);
  const tokens: string[] = [];
  for (let c = 0; c < opts.clients; c++) tokens.push(await createToken(opts.pool, site.id, "ingest"));
  const plans = Array.from({ length: opts.clients }, (_v, c) => planFor(c, opts.perClient, pts));
  const seen: Seen[] = [];
  const latencies: number[] = [];
  let next = 0;
  const instance = autocannon({
    url: opts.baseUrl,
    connections: opts.clients,
    maxConnectionRequests: opts.perClient,
    duration: 3600,
    timeout: 120,
    setupClient: (client) => {
      const c = next++;
      const reqs: AutocannonRequest[] = plans[c].map((p, index) => ({
        method: "POST",
        path: `/api/v1/sites/${site.slug}/epochs${p.query}`,
        headers: { authorization: `Bearer ${tokens[c]}`, "content-type": "application/json" },
        body: p.body,
        onResponse: (status, body) => {
          let outcome: string | null = null;
          let code: string | null = null;
          try {
            const j = JSON.parse(body) as { epochs?: { outcome: string }[]; error?: { code: string } };
            outcome = j.epochs?.[0]?.outcome ?? null;
            code = j.error?.code ?? null;
          } catch {
            /* not JSON: counted as wrong below */
          }
          seen.push({ client: c, index, kind: p.kind, time: p.time, status, outcome, code });
        },
      }));
      client.setRequests(reqs);
    },
  });
  instance.on("response", (_c, _s, _b, ms) => latencies.push(ms));
  const result = await instance;

  const problems: string[] = [];
  const byKind: Record<string, number> = {};
  let wrong = 0;
  const sharedCreated = new Map<string, number>();
  for (const s of seen) {
    byKind[s.kind] = (byKind[s.kind] ?? 0) + 1;
    let ok: boolean;
    if (s.kind === "new") ok = s.status === 201 && s.outcome === "created";
    else if (s.kind === "dup") ok = s.status === 200 && s.outcome === "unchanged";
    else if (s.kind === "revise") ok = s.status === 201 && s.outcome === "revised";
    else if (s.kind === "conflict") ok = s.status === 409 && s.code === "conflict";
    else {
      ok = (s.status === 201 && s.outcome === "created") || (s.status === 200 && s.outcome === "unchanged");
      if (s.status === 201) sharedCreated.set(s.time, (sharedCreated.get(s.time) ?? 0) + 1);
    }
    if (!ok) {
      wrong++;
      if (problems.length < 20) problems.push(`client ${s.client} request ${s.index} (${s.kind} ${s.time}): ${s.status} ${s.outcome ?? s.code ?? ""}`);
    }
  }
  const sharedTimes = new Set(plans.flat().filter((p) => p.kind === "shared").map((p) => p.time));
  for (const t of sharedTimes) if ((sharedCreated.get(t) ?? 0) !== 1) problems.push(`shared epoch ${t} was created ${sharedCreated.get(t) ?? 0} times (want exactly 1)`);
  if (seen.length !== opts.clients * opts.perClient) problems.push(`${seen.length} responses for ${opts.clients * opts.perClient} requests`);

  // SQL: every epoch time holds exactly its expected revisions, each with every observation once.
  const rows = await epochRows(opts.pool, site.id);
  const want = expectedRevisions(plans);
  const have = new Map<string, number[]>();
  for (const r of rows) {
    const t = r.time.toISOString();
    have.set(t, [...(have.get(t) ?? []), r.revision]);
    if (r.observations !== pts.length) problems.push(`epoch ${r.id} (${t} rev ${r.revision}) has ${r.observations} observations, want ${pts.length}`);
  }
  let lost = 0;
  let duplicated = 0;
  for (const [t, n] of want) {
    const revs = (have.get(t) ?? []).sort((a, b) => a - b);
    const expected = Array.from({ length: n }, (_v, i) => i + 1);
    if (revs.length < n) lost += n - revs.length;
    if (revs.length > n) duplicated += revs.length - n;
    if (JSON.stringify(revs) !== JSON.stringify(expected)) problems.push(`epoch time ${t}: revisions ${JSON.stringify(revs)}, want ${JSON.stringify(expected)}`);
  }
  for (const t of have.keys()) if (!want.has(t)) problems.push(`unexpected epoch time ${t}`);
  const current = await opts.pool.query<{ n: number }>(`select count(*)::int as n from "Epoch" where "siteId" = $1 and "isCurrent"`, [site.id]);
  if (current.rows[0].n !== want.size) problems.push(`${current.rows[0].n} current epochs, want ${want.size}`);

  const figures: LoadFigures = {
    clients: opts.clients,
    perClient: opts.perClient,
    requests: seen.length,
    durationS: result.duration,
    throughputPerS: seen.length / result.duration,
    p50Ms: percentile(latencies, 50),
    p95Ms: percentile(latencies, 95),
    p99Ms: percentile(latencies, 99),
    maxMs: Math.max(...latencies),
    byKind,
    wrongResponses: wrong,
    networkErrors: result.errors + result.timeouts,
    epochRows: rows.length,
    observations: rows.reduce((a, r) => a + r.observations, 0),
    lost,
    duplicated,
  };
  if (figures.networkErrors > 0) problems.push(`${figures.networkErrors} network errors or timeouts`);
  return { figures, problems };
}
