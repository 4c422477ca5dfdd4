/**
 * `epochal worker`: the job queue and mail worker on their own, for installations that run the
 * dashboard and the mail delivery in separate processes. Stops on SIGINT / SIGTERM.
 */
import { openDatabaseUrl } from "../../db/connect.ts";
import { closeDb } from "../../db/client.ts";
import { applyMigrations } from "../../db/migrate.ts";
import { mailConfigFromEnv } from "../../mail/config.ts";
import { startMailWorker, stopMailWorker } from "../../mail/queue.ts";
import { startBacklogSweep } from "../../alerts/register.ts";

export const help = `Usage: epochal worker

Runs the job queue (PostgreSQL, schema EPOCHAL_JOBS_SCHEMA, default pgboss): delivers queued alert
mails over SMTP_URL with retries and backoff, writes digests, and every minute evaluates the alerts of
epochs a stopped server left unevaluated (the alert backlog). Without SMTP_URL, mails stay in the
site's outbox. The dashboard server runs the same worker itself; this command is for running it apart.

Environment: DATABASE_URL (else the embedded database), SMTP_URL, EPOCHAL_MAIL_FROM, EPOCHAL_PUBLIC_URL,
EPOCHAL_MAIL_RETRY_LIMIT, EPOCHAL_MAIL_RETRY_DELAY_S, EPOCHAL_MAIL_DIGEST_MINUTES, EPOCHAL_JOBS_SCHEMA.`;

export async function run(args: string[]): Promise<number> {
  if (args.length > 0) {
    console.error(`epochal worker: unexpected argument ${args[0]}\n\n${help}`);
    return 2;
  }
  let config;
  try {
    config = mailConfigFromEnv();
  } catch (err) {
    console.error(`epochal worker: ${(err as Error).message}`);
    return 2;
  }
  const target = await openDatabaseUrl();
  await applyMigrations(target.url);
  await startMailWorker(config);
  await startBacklogSweep();
  console.log(
    `epochal worker: running (jobs schema ${config.jobsSchema}; ${config.smtpUrl ? `mail via ${new URL(config.smtpUrl).host}` : "no SMTP_URL: mails kept in the outbox"})`,
  );
  await new Promise<void>((resolve) => {
    process.once("SIGINT", () => resolve());
    process.once("SIGTERM", () => resolve());
  });
  console.log("epochal worker: stopping");
  await stopMailWorker();
  await closeDb();
  await target.detach();
  return 0;
}
