/**
 * The database-restart scenario, on a private PostgreSQL cluster (pg-cluster.ts): a client
 * streams epochs, a dashboard is open (a signed-in viewer's live-events stream and the site page
 * fetched again and again), then PostgreSQL is stopped for `outageS` seconds and started again.
 * The server must say so (health 503, ingest 503 `unavailable` with a clear message, not a raw
 * 500), recover by itself (no restart of the Next.js server), and lose nothing it acknowledged.
 */
import type pg from "pg";
import { addMembership, cheapHash, createSite, createToken, createUser, epochJson, epochRows, gridPoints, isoAt, postEpoch, signIn, T0, uniqueSlug } from "./fixtures.ts";
import { sleep, type TestServer } from "./server.ts";
import type { PrivateCluster } from "./pg-cluster.ts";

export type DbRestartFigures = {
  outageS: number;
  ingestRequests: number;
  acknowledgedBefore: number;
  acknowledgedAfter: number;
  answeredDuringOutage: Record<string, number>;
  healthDownDetectedMs: number | null;
  healthUpAfterStartMs: number | null;
  firstIngestOkAfterStartMs: number | null;
  pageStatusesDuringOutage: Record<string, number>;
  liveStreamStayedOpen: boolean;
  liveEventsAfterRecovery: number;
  serverProcessRestarts: number;
  retriedAfterwards: number;
  lost: number;
  duplicated: number;
};

type Answer = { time: string; status: number; body: string; at: number };

export async function runDbRestart(opts: { server: TestServer; pool: pg.Pool; cluster: PrivateCluster; outageS: number }): Promise<{ figures: DbRestartFigures; problems: string[]; outageBodies: string[] }> {
  const { server, pool, cluster } = opts;
  const problems: string[] = [];
  const pts = gridPoints(30);
  const site = await createSite(pool);
  const token = await createToken(pool, site.id, "ingest");
  const email = `${uniqueSlug("viewer")}@example.test`;
  const userId = await createUser(pool, { email, passwordHash: await cheapHash("reliability viewer password") });
  await addMembership(pool, userId, site.id, "viewer");
  const cookie = await signIn(server.baseUrl, email, "reliability viewer password");
  const startsBefore = server.starts;

  // The dashboard: a live-events stream held open through the outage, counting `epoch` events.
  const live = new AbortController();
  let liveOpen = false;
  let liveClosedAt: number | null = null;
  let liveEvents = 0;
  let liveEventsAfterRecovery = 0;
  let recovered = false;
  const liveDone = (async () => {
    const r = await fetch(`${server.baseUrl}/api/v1/sites/${site.slug}/events?maxS=600`, { headers: { cookie }, signal: live.signal });
    if (r.status !== 200 || !r.body) throw new Error(`events stream answered ${r.status}`);
    liveOpen = true;
    const dec = new TextDecoder();
    const reader = r.body.getReader();
    try {
      for (;;) {
        const { done, value } = await reader.read();
        if (done) break;
        const text = dec.decode(value);
        const n = (text.match(/^event: epoch$/gm) ?? []).length;
        liveEvents += n;
        if (recovered) liveEventsAfterRecovery += n;
      }
    } catch {
      /* aborted at the end */
    }
    liveClosedAt = Date.now();
  })();

  const answers: Answer[] = [];
  const pageStatuses: { status: number; at: number }[] = [];
  let stopAt = 0;
  let startAt = 0;
  let streaming = true;
  let i = 0;
  const ingest = (async () => {
    while (streaming) {
      const time = isoAt(T0 + ++i * 60_000);
      const r = await postEpoch(server.baseUrl, site.slug, token, epochJson(time, pts, 0, i * 1e-6), "", 20_000);
      answers.push({ time, status: r.status, body: r.body, at: Date.now() });
      await sleep(100);
    }
  })();
  const page = (async () => {
    while (streaming) {
      try {
        const r = await fetch(`${server.baseUrl}/sites/${site.slug}`, { headers: { cookie }, redirect: "manual", signal: AbortSignal.timeout(20_000) });
        await r.arrayBuffer();
        pageStatuses.push({ status: r.status, at: Date.now() });
      } catch {
        pageStatuses.push({ status: 0, at: Date.now() });
      }
      await sleep(500);
    }
  })();

  await sleep(2500);
  cluster.stop();
  stopAt = Date.now();
  let healthDown: number | null = null;
  while (Date.now() - stopAt < opts.outageS * 1000) {
    const r = await fetch(`${server.baseUrl}/api/health`).catch(() => null);
    if (r) {
      const h = (await r.json()) as { database?: { state?: string } };
      if (healthDown === null && r.status === 503 && h.database?.state === "down") healthDown = Date.now() - stopAt;
    }
    await sleep(250);
  }
  cluster.start();
  startAt = Date.now();
  recovered = true;
  let healthUp: number | null = null;
  while (Date.now() - startAt < 60_000) {
    const r = await fetch(`${server.baseUrl}/api/health`).catch(() => null);
    if (r && r.status === 200) {
      healthUp = Date.now() - startAt;
      break;
    }
    await r?.arrayBuffer();
    await sleep(100);
  }
  await sleep(3000);
  streaming = false;
  await Promise.all([ingest, page]);
  await sleep(500);
  const liveStayedOpen = liveOpen && liveClosedAt === null;
  live.abort();
  await liveDone.catch(() => undefined);

  // What the clients were told while the database was away.
  const during = answers.filter((a) => a.at > stopAt + 300 && a.at < startAt);
  const answeredDuring: Record<string, number> = {};
  for (const a of during) answeredDuring[a.status] = (answeredDuring[a.status] ?? 0) + 1;
  const outageBodies = [...new Set(during.filter((a) => a.status !== 201).map((a) => a.body))].slice(0, 3);
  for (const a of during) {
    if (a.status === 201) continue;
    let code = "";
    let message = "";
    try {
      const j = JSON.parse(a.body) as { error?: { code?: string; message?: string } };
      code = j.error?.code ?? "";
      message = j.error?.message ?? "";
    } catch {
      /* not JSON */
    }
    if (a.status !== 503 || code !== "unavailable" || !/database/i.test(message)) {
      problems.push(`during the outage ingest answered ${a.status} ${a.body.slice(0, 200)} (want 503 unavailable naming the database)`);
      break;
    }
  }
  const pageDuring: Record<string, number> = {};
  for (const p of pageStatuses.filter((p) => p.at > stopAt + 300 && p.at < startAt)) pageDuring[p.status] = (pageDuring[p.status] ?? 0) + 1;
  const lastPage = pageStatuses[pageStatuses.length - 1];
  if (!lastPage || lastPage.status !== 200) problems.push(`the site page answered ${lastPage?.status} after recovery (want 200)`);
  const firstOkAfter = answers.find((a) => a.at > startAt && a.status === 201);
  if (!firstOkAfter) problems.push("no ingest succeeded after the database came back");
  if (healthDown === null) problems.push("health never answered 503 during the outage");
  if (healthUp === null) problems.push("health did not answer 200 within 60 s of the database's restart");
  if (server.starts !== startsBefore) problems.push("the server process was restarted");
  if (!server.running) problems.push("the server process died");

  // Nothing acknowledged is lost; a client that retries gets the rest in.
  const acknowledged = answers.filter((a) => a.status === 201);
  let retried = 0;
  for (const a of answers)
    if (a.status !== 201) {
      const idx = Number(new Date(a.time).getTime() - T0) / 60_000;
      for (let attempt = 0; attempt < 20; attempt++) {
        const r = await postEpoch(server.baseUrl, site.slug, token, epochJson(a.time, pts, 0, idx * 1e-6));
        if (r.status === 201 || r.status === 200) break;
        await sleep(500);
      }
      retried++;
    }
  const rows = await epochRows(pool, site.id);
  const stored = new Map<string, number>();
  for (const r of rows) {
    stored.set(r.time.toISOString(), (stored.get(r.time.toISOString()) ?? 0) + 1);
    if (r.observations !== pts.length) problems.push(`epoch ${r.id} has ${r.observations} observations, want ${pts.length}`);
  }
  let lost = 0;
  for (const a of acknowledged) if (!stored.has(a.time)) (lost++, problems.push(`acknowledged epoch ${a.time} is missing`));
  for (const a of answers) if (!stored.has(a.time)) problems.push(`epoch ${a.time} is missing after the retries`);
  let duplicated = 0;
  for (const [t, n] of stored) if (n !== 1) (duplicated += n - 1, problems.push(`epoch ${t} stored ${n} times`));

  return {
    figures: {
      outageS: opts.outageS,
      ingestRequests: answers.length,
      acknowledgedBefore: acknowledged.filter((a) => a.at < stopAt).length,
      acknowledgedAfter: acknowledged.filter((a) => a.at >= startAt).length,
      answeredDuringOutage: answeredDuring,
      healthDownDetectedMs: healthDown,
      healthUpAfterStartMs: healthUp,
      firstIngestOkAfterStartMs: firstOkAfter ? firstOkAfter.at - startAt : null,
      pageStatusesDuringOutage: pageDuring,
      liveStreamStayedOpen: liveStayedOpen,
      liveEventsAfterRecovery,
      serverProcessRestarts: server.starts - startsBefore,
      retriedAfterwards: retried,
      lost,
      duplicated,
    },
    problems,
    outageBodies,
  };
}
