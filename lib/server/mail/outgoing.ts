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
import type { Prisma } from "../db/generated/client.ts";
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

export async function recordAlertMails(
  tx: Prisma.TransactionClient,
  opts: { siteId: number; alertId: number; eventId: bigint; facts: AlertMailFacts; recipients: readonly Recipient[]; hasSmtp: boolean },
): Promise<AlertMailResult> {
  const { immediate, digest } = recipientsFor(opts.recipients, opts.facts.level);
  const out: AlertMailResult = { queuedIds: [], digestItems: 0 };
  const subject = alertSubject(opts.facts);
  if (immediate.length) {
    const key = `alert:${opts.alertId}:${opts.eventId}:${immediate.join(",")}`;
    const status: MailStatus = opts.hasSmtp ? "queued" : "outbox";
    const rows = await tx.mailMessage.createManyAndReturn({
      data: [{ siteId: opts.siteId, alertId: opts.alertId, idempotencyKey: key, recipients: immediate, subject, body: alertBody(opts.facts), status }],
      skipDuplicates: true,
      select: { id: true },
    });
    if (opts.hasSmtp) out.queuedIds.push(...rows.map((r) => r.id));
  }
  if (digest.length) {
    const key = `digest-item:${opts.alertId}:${opts.eventId}:${digest.join(",")}`;
    const r = await tx.mailMessage.createMany({
      data: [{ siteId: opts.siteId, alertId: opts.alertId, idempotencyKey: key, recipients: digest, subject, body: alertLines(opts.facts).join("\n"), status: "digest-item" }],
      skipDuplicates: true,
    });
    out.digestItems += r.count;
  }
  return out;
}
