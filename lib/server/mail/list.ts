/** The mail record of a site: the outbox (no mail server) and the delivery status of sent mails. */
import "server-only";
import { getDb, type Db } from "../db/client.ts";
import type { MailMessage } from "../db/generated/client.ts";
import { alertsSettled } from "../alerts/pending.ts";

export async function listMails(siteId: number, q: { status: "outbox" | "queued" | "sent" | "failed" | "all"; limit: number }, db: Db = getDb()): Promise<MailMessage[]> {
  await alertsSettled(siteId);
  // Digest items are lines of a future digest, not mails: only "all" shows them.
  return db.mailMessage.findMany({
    where: { siteId, ...(q.status === "all" ? {} : { status: q.status }) },
    orderBy: { id: "desc" },
    take: q.limit,
  });
}

export function mailJson(m: MailMessage) {
  return {
    id: m.id,
    alertId: m.alertId,
    idempotencyKey: m.idempotencyKey,
    recipients: m.recipients,
    subject: m.subject,
    body: m.body,
    status: m.status,
    attempts: m.attempts,
    lastError: m.lastError,
    sentAt: m.sentAt?.toISOString() ?? null,
    createdAt: m.createdAt.toISOString(),
  };
}
