/**
 * The mail-outage scenario: the production server sends alert mails to a real SMTP server
 * (smtp-server, test/db/alerts/fixtures.ts) on 127.0.0.1. During an event (epochs posted over
 * HTTP that open an alert and escalate it twice) the SMTP server is down; optionally the Next.js
 * server is also SIGKILLed and restarted meanwhile. When SMTP returns, every alert mail must be
 * delivered, none twice (counted by Message-ID at the SMTP server and against MailMessage rows).
 */
import type pg from "pg";
import { startSmtp } from "../../db/alerts/fixtures.ts";
import { createSite, createToken, epochJson, isoAt, postEpoch, T0, type Pt } from "./fixtures.ts";
import { sleep, TestServer } from "./server.ts";

export type MailOutageFigures = {
  outageS: number;
  serverKilledDuringOutage: boolean;
  alertMails: number;
  failedAttemptsWhileDown: number;
  delivered: number;
  deliveredTwice: number;
  secondsToDeliverAfterReturn: number;
};

const UE = 1e-6;

export async function runMailOutage(opts: { databaseUrl: string; pool: pg.Pool; outageS: number; killServer: boolean }): Promise<{ figures: MailOutageFigures; problems: string[] }> {
  const problems: string[] = [];
  let smtp = await startSmtp();
  const port = smtp.port;
  const server = await TestServer.start({
    databaseUrl: opts.databaseUrl,
    env: { SMTP_URL: `smtp://127.0.0.1:${port}`, EPOCHAL_MAIL_FROM: "epochal@example.test", EPOCHAL_MAIL_RETRY_DELAY_S: "1", EPOCHAL_MAIL_RETRY_LIMIT: "30", EPOCHAL_JOBS_SCHEMA: "pgboss_reliability" },
  });
  try {
    await server.waitHealthy();
    const { pool } = opts;
    const site = await createSite(pool);
    const token = await createToken(pool, site.id, "ingest");
    await pool.query(`insert into "Element"("siteId", name, label, kind, mode, "pointCodes") values ($1, 'BLD-1', 'north facade', 'triangle', 'plan', '{A,B,C}')`, [site.id]);
    await pool.query(
      `insert into "TriggerRule"("siteId", name, quantity, "elementIds", "reviewLevel", "alertLevel", "limitLevel", hysteresis, "significantOnly")
       select $1, 'Facade tension', 'greenMax', array[e.id], $2, $3, $4, $5, false from "Element" e where e."siteId" = $1`,
      [site.id, 500 * UE, 750 * UE, 1500 * UE, 50 * UE],
    );
    const recipients = [`${site.slug}-a@example.test`, `${site.slug}-b@example.test`];
    for (const r of recipients) await pool.query(`insert into "MailRecipient"("siteId", email) values ($1, $2)`, [site.id, r]);
    // A 20 m right triangle stretched along east: greenMax = s + s²/2 (uniaxial stretch, derived).
    const pts: Pt[] = [
      { code: "A", east: 1000, north: 2000, height: 50 },
      { code: "B", east: 1020, north: 2000, height: 50 },
      { code: "C", east: 1000, north: 2020, height: 50 },
    ];
    const post = async (i: number, stretch: number) => {
      const r = await postEpoch(server.baseUrl, site.slug, token, epochJson(isoAt(T0 + i * 3_600_000), pts, 0, stretch));
      if (r.status !== 201) problems.push(`epoch ${i}: ${r.status} ${r.body.slice(0, 200)}`);
    };
    await post(0, 0);

    await smtp.close();
    const downAt = Date.now();
    // The event: review opens, escalates to alert, then to limit.
    for (const [i, s] of [[1, 600 * UE], [2, 900 * UE], [3, 1700 * UE]] as const) await post(i, s);
    const alertMails = async () => (await pool.query<{ id: number; status: string; attempts: number; lastError: string | null }>(`select id, status, attempts, "lastError" from "MailMessage" where "siteId" = $1 and "alertId" is not null`, [site.id])).rows;
    // Wait until each mail has failed at least once against the closed port.
    for (const t0 = Date.now(); ; ) {
      const rows = await alertMails();
      if (rows.length >= 3 && rows.every((r) => r.attempts >= 1 && r.lastError)) break;
      if (Date.now() - t0 > 30_000) {
        problems.push(`mails did not fail while SMTP was down: ${JSON.stringify(rows)}`);
        break;
      }
      await sleep(250);
    }
    if (opts.killServer) {
      await server.kill("SIGKILL");
      await server.startProcess();
      await server.waitHealthy();
    }
    await sleep(Math.max(0, opts.outageS * 1000 - (Date.now() - downAt)));
    const failedAttempts = (await alertMails()).reduce((a, r) => a + r.attempts, 0);
    smtp = await startSmtp(port);
    const upAt = Date.now();
    let rows = await alertMails();
    // Backoff doubles from 1 s, so the last retry may be up to ~2× the outage away.
    while (!(rows.length >= 3 && rows.every((r) => r.status === "sent")) && Date.now() - upAt < (opts.outageS * 3 + 60) * 1000) {
      await sleep(500);
      rows = await alertMails();
    }
    const deliveredAfterS = (Date.now() - upAt) / 1000;
    await sleep(3000); // anything sent twice would arrive now
    const mine = smtp.mails.filter((m) => m.to.some((t) => recipients.includes(t)));
    const ids = mine.map((m) => /^Message-ID:\s*(\S+)/im.exec(m.raw)?.[1] ?? "");
    const twice = ids.length - new Set(ids).size;
    if (!rows.every((r) => r.status === "sent")) problems.push(`not every alert mail was sent: ${JSON.stringify(rows)}`);
    if (mine.length !== rows.length) problems.push(`${mine.length} mails arrived for ${rows.length} MailMessage rows`);
    if (twice > 0) problems.push(`${twice} mails arrived twice`);
    if (rows.length < 3) problems.push(`${rows.length} alert mails, want at least 3 (open, escalate, escalate)`);
    for (const m of mine) for (const r of recipients) if (!m.to.includes(r)) problems.push(`a mail did not go to ${r}`);
    return {
      figures: { outageS: opts.outageS, serverKilledDuringOutage: opts.killServer, alertMails: rows.length, failedAttemptsWhileDown: failedAttempts, delivered: mine.length, deliveredTwice: twice, secondsToDeliverAfterReturn: deliveredAfterS },
      problems,
    };
  } finally {
    await server.stop();
    await smtp.close().catch(() => undefined);
  }
}
