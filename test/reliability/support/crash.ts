/**
 * The crash scenario: two clients stream epochs (each with its own times) while the server is
 * killed with SIGKILL at seeded random moments and started again. A client retries a request
 * until it is answered 201 or 200 (a retry of an epoch whose commit survived the kill is 200).
 * After each kill, before the restart, SQL checks that every Epoch row is whole: all of its
 * observations and all of its element results, or no row at all; at the end every epoch is
 * stored exactly once.
 */
import type pg from "pg";
import { createToken, createSite, epochJson, epochRows, gridPoints, isoAt, postEpoch, T0, type Pt } from "./fixtures.ts";
import { sleep, type TestServer } from "./server.ts";

/** Mulberry32: a small seeded generator, so a failing run can be repeated with its seed. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export type CrashFigures = {
  seed: number;
  kills: number;
  epochsPosted: number;
  requestsSent: number;
  retries: number;
  retriesAnsweredUnchanged: number;
  partialEpochsSeen: number;
  acknowledgedMissingAfterKill: number;
  restartToHealthyMsMax: number;
  finalEpochRows: number;
  lost: number;
  duplicated: number;
};

const ELEMENTS: { name: string; kind: string; mode: string; points: string[] }[] = [
  { name: "T1", kind: "triangle", mode: "plan", points: ["P1", "P2", "P4"] },
  { name: "T2", kind: "triangle", mode: "plan", points: ["P2", "P5", "P4"] },
  { name: "B1", kind: "baseline", mode: "slope", points: ["P1", "P9"] },
];

export async function runCrash(opts: { server: TestServer; pool: pg.Pool; kills: number; epochsPerClient: number; points?: number; seed?: number }): Promise<{ figures: CrashFigures; problems: string[] }> {
  const seed = opts.seed ?? Number(process.env.RELIABILITY_SEED ?? Date.now() % 1_000_000);
  const rand = seededRandom(seed);
  const pts: Pt[] = gridPoints(opts.points ?? 200);
  const { server, pool } = opts;
  const site = await createSite(pool);
  for (const e of ELEMENTS) await pool.query(`insert into "Element"("siteId", name, kind, mode, "pointCodes") values ($1, $2, $3, $4, $5)`, [site.id, e.name, e.kind, e.mode, e.points]);
  const tokens = [await createToken(pool, site.id, "ingest"), await createToken(pool, site.id, "ingest")];
  const problems: string[] = [];

  // The reference epoch first, then fixed as the site's reference so every later epoch gets one result per element.
  const refTime = isoAt(T0);
  const ref = await postEpoch(server.baseUrl, site.slug, tokens[0], epochJson(refTime, pts));
  if (ref.status !== 201) throw new Error(`reference epoch: ${ref.status} ${ref.body.slice(0, 300)}`);
  const refId = (JSON.parse(ref.body) as { epochs: { id: number }[] }).epochs[0].id;
  await pool.query(`update "Site" set "referenceEpochId" = $1 where id = $2`, [refId, site.id]);
  const refResults = (await epochRows(pool, site.id))[0].results;

  const acknowledged = new Set<string>();
  let sent = 0;
  let retries = 0;
  let retriesUnchanged = 0;
  let killing = true;
  const posted = [0, 0];

  // Each client posts at least epochsPerClient epochs, and goes on until the last kill is done.
  const client = async (c: number): Promise<void> => {
    for (let i = 0; (i < opts.epochsPerClient || killing) && i < 100_000; i++) {
      posted[c] = i + 1;
      const time = isoAt(T0 + (1 + c * 100_000 + i) * 60_000);
      const body = epochJson(time, pts, 0, 1e-5 * (i + 1));
      for (let attempt = 0; ; attempt++) {
        if (attempt > 0) retries++;
        if (attempt > 600) throw new Error(`client ${c}: epoch ${time} never stored`);
        sent++;
        const r = await postEpoch(server.baseUrl, site.slug, tokens[c], body, "", 20_000);
        if (r.status === 201 || r.status === 200) {
          if (attempt > 0 && r.status === 200) retriesUnchanged++;
          if (attempt === 0 && r.status === 200) problems.push(`first post of ${time} answered 200`);
          acknowledged.add(time);
          break;
        }
        // Server gone (0), restarting, or database reconnecting: wait and retry; anything else is wrong.
        if (r.status !== 0 && r.status !== 503 && r.status !== 502) {
          problems.push(`client ${c} ${time}: ${r.status} ${r.body.slice(0, 200)}`);
          if (r.status < 500) break;
        }
        await sleep(150);
      }
    }
  };

  let partial = 0;
  let missingAck = 0;
  let restartMax = 0;
  const checkWhole = async (when: string): Promise<void> => {
    const rows = await epochRows(pool, site.id);
    const times = new Set(rows.map((r) => r.time.toISOString()));
    for (const r of rows) {
      const wantResults = r.id === refId ? refResults : ELEMENTS.length;
      if (r.observations !== pts.length || r.results !== wantResults) {
        partial++;
        problems.push(`${when}: epoch ${r.id} has ${r.observations}/${pts.length} observations and ${r.results}/${wantResults} results`);
      }
    }
    for (const t of acknowledged)
      if (!times.has(t)) {
        missingAck++;
        problems.push(`${when}: acknowledged epoch ${t} is not in the database`);
      }
  };

  const killer = async (): Promise<number> => {
    let kills = 0;
    for (let k = 0; k < opts.kills; k++) {
      await sleep(400 + rand() * 1600);
      await server.kill("SIGKILL");
      kills++;
      await checkWhole(`after kill ${kills}`);
      const t0 = Date.now();
      await server.startProcess();
      await server.waitHealthy();
      restartMax = Math.max(restartMax, Date.now() - t0);
    }
    return kills;
  };

  const kills = await Promise.all([
    killer().finally(() => {
      killing = false;
    }),
    client(0),
    client(1),
  ]).then(([k]) => k);
  await checkWhole("at the end");

  const rows = await epochRows(pool, site.id);
  const perTime = new Map<string, number>();
  for (const r of rows) perTime.set(r.time.toISOString(), (perTime.get(r.time.toISOString()) ?? 0) + 1);
  const want = 1 + posted[0] + posted[1];
  let duplicated = 0;
  for (const [t, n] of perTime)
    if (n !== 1) {
      duplicated += n - 1;
      problems.push(`epoch ${t} stored ${n} times`);
    }
  const lost = want - perTime.size;
  if (lost !== 0) problems.push(`${perTime.size} epoch times stored, want ${want}`);

  return {
    figures: {
      seed,
      kills,
      epochsPosted: posted[0] + posted[1],
      requestsSent: sent,
      retries,
      retriesAnsweredUnchanged: retriesUnchanged,
      partialEpochsSeen: partial,
      acknowledgedMissingAfterKill: missingAck,
      restartToHealthyMsMax: restartMax,
      finalEpochRows: rows.length,
      lost,
      duplicated,
    },
    problems,
  };
}
