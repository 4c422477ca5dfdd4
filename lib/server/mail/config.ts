/** Mail settings, from the environment (see lib/server/schemas/alerts.ts for the variables). */
import { MailEnv } from "../schemas/alerts.ts";
import { AppError } from "../errors.ts";

export type MailConfig = {
  /** null: no mail server, mails are kept in the outbox. */
  smtpUrl: string | null;
  from: string;
  publicUrl: string;
  retryLimit: number;
  retryDelayS: number;
  digestMinutes: number;
  /** PostgreSQL schema of the job queue. */
  jobsSchema: string;
};

export function mailConfigFromEnv(env: Record<string, string | undefined> = process.env): MailConfig {
  const r = MailEnv.safeParse(env);
  if (!r.success) throw new AppError("invalid", `Mail settings: ${r.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
  const e = r.data;
  return {
    smtpUrl: e.SMTP_URL ?? null,
    from: e.EPOCHAL_MAIL_FROM,
    publicUrl: e.EPOCHAL_PUBLIC_URL.replace(/\/+$/, ""),
    retryLimit: e.EPOCHAL_MAIL_RETRY_LIMIT,
    retryDelayS: e.EPOCHAL_MAIL_RETRY_DELAY_S,
    digestMinutes: e.EPOCHAL_MAIL_DIGEST_MINUTES,
    jobsSchema: e.EPOCHAL_JOBS_SCHEMA,
  };
}
