/**
 * Digests: recipients with digest=true get one mail per period listing the alert events since their
 * last digest, instead of one mail per event. Alerting writes one `digest-item` row per event and
 * schedules one delayed job per site (queue.ts: at most one waiting per site, so the first event of a
 * quiet spell starts the period and later ones join it). The job gathers the site's waiting items,
 * writes one digest mail per recipient (key digest:<siteId>:<firstItemId>-<lastItemId>:<email>), marks
 * the items `digested`, and returns the new mails' ids for the queue.
 */
import type { Db } from "../db/client.ts";
import { digestBody, digestSubject } from "./compose.ts";

/** Advisory lock class of digest runs (the second key is the site id). */
const DIGEST_LOCK_CLASS = 727_002;

export async function composeDigests(db: Db, siteId: number, opts: { hasSmtp: boolean }): Promise<number[]> {
  return db.$transaction(
    async (tx) => {
      await tx.$executeRaw`SELECT pg_advisory_xact_lock(${DIGEST_LOCK_CLASS}::int, ${siteId}::int)`;
      const site = await tx.site.findUnique({ where: { id: siteId }, select: { name: true, slug: true } });
      if (!site) return [];
      const items = await tx.mailMessage.findMany({ where: { siteId, status: "digest-item" }, orderBy: { id: "asc" } });
      if (items.length === 0) return [];
      const byEmail = new Map<string, typeof items>();
      for (const it of items)
        for (const email of it.recipients) {
          const list = byEmail.get(email) ?? [];
          list.push(it);
          byEmail.set(email, list);
        }
      const ids: number[] = [];
      for (const [email, list] of [...byEmail.entries()].sort(([a], [b]) => a.localeCompare(b))) {
        const key = `digest:${siteId}:${list[0].id}-${list[list.length - 1].id}:${email}`;
        const rows = await tx.mailMessage.createManyAndReturn({
          data: [
            {
              siteId,
              alertId: null,
              idempotencyKey: key,
              recipients: [email],
              subject: digestSubject(site, list.length),
              body: digestBody(site, list.map((i) => i.body)),
              status: opts.hasSmtp ? "queued" : "outbox",
            },
          ],
          skipDuplicates: true,
          select: { id: true },
        });
        if (opts.hasSmtp) ids.push(...rows.map((r) => r.id));
      }
      await tx.mailMessage.updateMany({ where: { id: { in: items.map((i) => i.id) } }, data: { status: "digested" } });
      return ids;
    },
    { timeout: 60_000, maxWait: 30_000 },
  );
}
