/**
 * Delivering one MailMessage. The row is locked (SELECT … FOR UPDATE) while the mail goes out, so two
 * workers cannot send it twice; a row already `sent` is skipped. A failure is written to the row
 * (attempts, lastError) and reported back so the job queue retries it with backoff; the last attempt
 * marks it `failed`. The Message-ID is derived from the idempotency key, so even a mail handed to the
 * server twice (a crash between the server's OK and our commit) carries the same id for the receiver.
 */
import { createHash } from "node:crypto";
import nodemailer, { type Transporter } from "nodemailer";
import type { Db } from "../db/client.ts";

export type DeliverOutcome = "sent" | "skipped" | "retry" | "failed";

export function createMailTransport(smtpUrl: string): Transporter {
  return nodemailer.createTransport({ url: smtpUrl, connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000 });
}

export function messageIdFor(idempotencyKey: string): string {
  return `<${createHash("sha256").update(idempotencyKey).digest("hex").slice(0, 32)}@epochal>`;
}

export async function deliverMail(
  db: Db,
  mailId: number,
  opts: { transport: Transporter; from: string; isLastAttempt: boolean },
): Promise<{ outcome: DeliverOutcome; error?: string }> {
  let error: string | undefined;
  const outcome = await db.$transaction(
    async (tx) => {
      const rows = await tx.$queryRaw<{ id: number; status: string }[]>`SELECT id, status FROM "MailMessage" WHERE id = ${mailId} FOR UPDATE`;
      if (rows.length === 0 || rows[0].status !== "queued") return "skipped" as const;
      const m = await tx.mailMessage.findUniqueOrThrow({ where: { id: mailId } });
      try {
        await opts.transport.sendMail({ from: opts.from, to: m.recipients, subject: m.subject, text: m.body, messageId: messageIdFor(m.idempotencyKey) });
      } catch (err) {
        error = err instanceof Error ? err.message : String(err);
        await tx.mailMessage.update({
          where: { id: mailId },
          data: { attempts: { increment: 1 }, lastError: error.slice(0, 2000), status: opts.isLastAttempt ? "failed" : "queued" },
        });
        return opts.isLastAttempt ? ("failed" as const) : ("retry" as const);
      }
      await tx.mailMessage.update({ where: { id: mailId }, data: { attempts: { increment: 1 }, status: "sent", sentAt: new Date(), lastError: null } });
      return "sent" as const;
    },
    { timeout: 120_000, maxWait: 30_000 },
  );
  return { outcome, error };
}
