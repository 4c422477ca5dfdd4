/**
 * The job queue (pg-boss, in PostgreSQL) and the mail worker, one per process.
 *
 *   epochal-mail         one job per MailMessage id; job id derived from the idempotency key, so the
 *                        same mail is never queued twice; retried with exponential backoff
 *                        (retryDelay · 2^n with jitter) up to retryLimit while the server is down
 *   epochal-mail-digest  one delayed job per site (policy "short": at most one waiting per site)
 *
 * The worker starts lazily with alerting (register.ts) or standalone (`epochal worker`). On start it
 * re-queues every mail still `queued` in the table, so a crash between commit and queueing loses nothing.
 */
import { createHash } from "node:crypto";
import PgBoss from "pg-boss";
import type { Transporter } from "nodemailer";
import { databaseUrl, getDb } from "../db/client.ts";
import { mailConfigFromEnv, type MailConfig } from "./config.ts";
import { createMailTransport, deliverMail } from "./deliver.ts";
import { composeDigests } from "./digest.ts";

export const MAIL_QUEUE = "epochal-mail";
export const DIGEST_QUEUE = "epochal-mail-digest";

type MailJob = { mailId: number };
type DigestJob = { siteId: number };

export type MailRuntime = { boss: PgBoss; config: MailConfig; transport: Transporter | null };

const KEY = Symbol.for("epochal.mail-runtime");
type Holder = { [KEY]?: Promise<MailRuntime> };

/** A UUID-shaped id from a key (sha-256, version nibble 5, RFC 4122 variant). */
export function jobIdFor(key: string): string {
  const h = createHash("sha256").update(key).digest("hex");
  const variant = ((parseInt(h[16], 16) & 0x3) | 0x8).toString(16);
  return `${h.slice(0, 8)}-${h.slice(8, 12)}-5${h.slice(13, 16)}-${variant}${h.slice(17, 20)}-${h.slice(20, 32)}`;
}

async function start(config: MailConfig): Promise<MailRuntime> {
  const boss = new PgBoss({ connectionString: databaseUrl(), schema: config.jobsSchema, max: 4, application_name: "epochal-jobs" });
  boss.on("error", (err) => console.error("epochal: job queue error", err));
  await boss.start();
  try {
    return await prepare(boss, config);
  } catch (err) {
    await boss.stop({ graceful: false, wait: true }).catch(() => undefined);
    throw err;
  }
}

async function prepare(boss: PgBoss, config: MailConfig): Promise<MailRuntime> {
  await boss.createQueue(MAIL_QUEUE, { name: MAIL_QUEUE, policy: "standard", retryLimit: config.retryLimit, retryDelay: config.retryDelayS, retryBackoff: true });
  await boss.createQueue(DIGEST_QUEUE, { name: DIGEST_QUEUE, policy: "short", retryLimit: 5, retryDelay: 60, retryBackoff: true });
  const transport = config.smtpUrl ? createMailTransport(config.smtpUrl) : null;
  const rt: MailRuntime = { boss, config, transport };

  await boss.work<MailJob>(MAIL_QUEUE, { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 0.5 }, async ([job]) => {
    if (!rt.transport) return; // no mail server configured in this process: the row stays as it is
    const r = await deliverMail(getDb(), job.data.mailId, { transport: rt.transport, from: config.from, isLastAttempt: job.retryCount >= job.retryLimit });
    if (r.outcome === "retry" || r.outcome === "failed") throw new Error(`mail ${job.data.mailId}: ${r.error ?? "not delivered"}`);
  });
  await boss.work<DigestJob>(DIGEST_QUEUE, { batchSize: 1, pollingIntervalSeconds: 0.5 }, async ([job]) => {
    const ids = await composeDigests(getDb(), job.data.siteId, { hasSmtp: rt.transport !== null });
    await sendMailJobs(rt, ids);
  });

  const pending = await getDb().mailMessage.findMany({ where: { status: "queued" }, select: { id: true }, orderBy: { id: "asc" } });
  await sendMailJobs(rt, pending.map((p) => p.id));
  return rt;
}

/** Starts the queue and the mail worker once per process (later calls return the same runtime). */
export function startMailWorker(config: MailConfig = mailConfigFromEnv()): Promise<MailRuntime> {
  const holder = globalThis as Holder;
  if (!holder[KEY]) {
    const p = start(config);
    holder[KEY] = p;
    p.catch(() => {
      if (holder[KEY] === p) holder[KEY] = undefined;
    });
  }
  return holder[KEY]!;
}

export function mailWorkerRunning(): boolean {
  return (globalThis as Holder)[KEY] !== undefined;
}

export async function stopMailWorker(): Promise<void> {
  const holder = globalThis as Holder;
  const p = holder[KEY];
  holder[KEY] = undefined;
  if (!p) return;
  const rt = await p.catch(() => null);
  if (!rt) return;
  await rt.boss.stop({ graceful: true, wait: true, timeout: 10_000 });
  rt.transport?.close();
}

async function sendMailJobs(rt: MailRuntime, mailIds: readonly number[]): Promise<void> {
  if (mailIds.length === 0) return;
  const rows = await getDb().mailMessage.findMany({ where: { id: { in: [...mailIds] } }, select: { id: true, idempotencyKey: true } });
  for (const m of rows) {
    await rt.boss.send(MAIL_QUEUE, { mailId: m.id } satisfies MailJob, {
      id: jobIdFor(m.idempotencyKey),
      retryLimit: rt.config.retryLimit,
      retryDelay: rt.config.retryDelayS,
      retryBackoff: true,
    });
  }
}

/** Queues delivery of committed MailMessage rows (duplicates are ignored by job id). */
export async function enqueueMails(mailIds: readonly number[]): Promise<void> {
  if (mailIds.length === 0) return;
  await sendMailJobs(await startMailWorker(), mailIds);
}

/** Makes sure a digest job is waiting for the site (one per period). */
export async function scheduleDigest(siteId: number): Promise<void> {
  const rt = await startMailWorker();
  await rt.boss.sendAfter(DIGEST_QUEUE, { siteId } satisfies DigestJob, { singletonKey: `site:${siteId}` }, Math.max(1, Math.round(rt.config.digestMinutes * 60)));
}
