/**
 * Mail rows written in the alert transaction. Nothing is sent here: the rows are the record, and after
 * commit their ids go to the job queue (queue.ts). Every row has an idempotency key, unique in the
 * table, so evaluating the same epochs twice cannot make a second mail.
 *
 *   immediate  key alert:<alertId>:<eventId>:<recipients, sorted, comma-joined>
 *              status queued (SMTP_URL set) or outbox (no mail server)
 *   digest     key digest-item:<alertId>:<eventId>:<recipients>, status digest-item: one line of the next
 *              digest for recipients with digest=true; the digest job (digest.ts) collects them
 */
import type { Sql } from "../ingest/pg-tx.ts";
import { textArray } from "../ingest/sql-arrays.ts";
import { levelRank, isTriggerLevel, type TriggerLevel } from "../../triggers/rule.ts";
import { alertBody, alertLines, alertSubject, type AlertMailFacts } from "./compose.ts";

export const MAIL_STATUSES = ["queued", "sent", "failed", "outbox", "digest-item", "digested"] as const;
export type MailStatus = (typeof MAIL_STATUSES)[number];

type Recipient = { email: string; minLevel: string; digest: boolean };

/** Recipients whose minimum level the event's level reaches (an unknown minLevel counts as review). */
export function recipientsFor(recipients: readonly Recipient[], level: TriggerLevel): { immediate: string[]; digest: string[] } {
  const fits = (r: Recipient) => levelRank(level) >= levelRank(isTriggerLevel(r.minLevel) ? r.minLevel : "review");
  const immediate = recipients.filter((r) => !r.digest && fits(r)).map((r) => r.email.toLowerCase());
  const digest = recipients.filter((r) => r.digest && fits(r)).map((r) => r.email.toLowerCase());
  return { immediate: [...new Set(immediate)].sort(), digest: [...new Set(digest)].sort() };
}

export type AlertMailResult = { queuedIds: number[]; digestItems: number };

/** A mail row; `ON CONFLICT DO NOTHING` on the idempotency key (evaluating the same epochs twice). Returns the new id, or null. */
async function insertMail(tx: Sql, m: { siteId: number; alertId: number; idempotencyKey: string; recipients: string[]; subject: string; body: string; status: MailStatus }): Promise<number | null> {
  const rows = await tx.query<{ id: number }>(
    `INSERT INTO "MailMessage" ("siteId", "alertId", "idempotencyKey", recipients, subject, body, status)
     VALUES ($1, $2, $3, $4::text[], $5, $6, $7) ON CONFLICT ("idempotencyKey") DO NOTHING RETURNING id`,
    [m.siteId, m.alertId, m.idempotencyKey, textArray(m.recipients), m.subject, m.body, m.status],
  );
  return rows[0]?.id ?? null;
}

/** Writes the mail rows of one alert event in the evaluation's transaction. */
export async function recordAlertMails(
  tx: Sql,
  opts: { siteId: number; alertId: number; eventId: bigint; facts: AlertMailFacts; recipients: readonly Recipient[]; hasSmtp: boolean },
): Promise<AlertMailResult> {
  const { immediate, digest } = recipientsFor(opts.recipients, opts.facts.level);
  const out: AlertMailResult = { queuedIds: [], digestItems: 0 };
  const subject = alertSubject(opts.facts);
  if (immediate.length) {
    const key = `alert:${opts.alertId}:${opts.eventId}:${immediate.join(",")}`;
    const status: MailStatus = opts.hasSmtp ? "queued" : "outbox";
    const id = await insertMail(tx, { siteId: opts.siteId, alertId: opts.alertId, idempotencyKey: key, recipients: immediate, subject, body: alertBody(opts.facts), status });
    if (opts.hasSmtp && id !== null) out.queuedIds.push(id);
  }
  if (digest.length) {
    const key = `digest-item:${opts.alertId}:${opts.eventId}:${digest.join(",")}`;
    const id = await insertMail(tx, { siteId: opts.siteId, alertId: opts.alertId, idempotencyKey: key, recipients: digest, subject, body: alertLines(opts.facts).join("\n"), status: "digest-item" });
    if (id !== null) out.digestItems += 1;
  }
  return out;
}
