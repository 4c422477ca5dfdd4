/**
 * Mail recipients of a site: who is told when a trigger level is crossed (outgoing.ts picks them by
 * level for each alert event). List, add, change the minimum level or the digest flag, remove. Every
 * change writes an audit row in the same transaction (who, when, before, after), as rules do.
 * Removing deletes the row: mails already written keep their own recipient list, and the audit
 * entry keeps the removed row.
 */
import { getDb, type Db } from "../db/client.ts";
import { AppError } from "../errors.ts";
import { recordAudit } from "../audit.ts";
import type { MailRecipient } from "../db/generated/client.ts";
import type { RecipientCreateInput, RecipientPatchInput } from "../schemas/recipients.ts";

export type RecipientJson = { id: number; siteId: number; email: string; minLevel: string; digest: boolean };

export function recipientJson(r: MailRecipient): RecipientJson {
  return { id: r.id, siteId: r.siteId, email: r.email, minLevel: r.minLevel, digest: r.digest };
}

function notFound(id: number): AppError {
  return new AppError("not_found", `No mail recipient ${id} on this site.`);
}

/** By address (the list a person reads), then id. */
export async function listRecipients(siteId: number, db: Db = getDb()): Promise<MailRecipient[]> {
  return db.mailRecipient.findMany({ where: { siteId }, orderBy: [{ email: "asc" }, { id: "asc" }] });
}

/** The recipient with this address (any spelling) on the site, or null. */
export async function findRecipientByEmail(siteId: number, email: string, db: Db = getDb()): Promise<MailRecipient | null> {
  return db.mailRecipient.findFirst({ where: { siteId, email: { equals: email.trim(), mode: "insensitive" } } });
}

function duplicate(email: string, id: number | null): AppError {
  const which = id === null ? "" : ` (recipient ${id})`;
  return new AppError("conflict", `email: ${email} is already a recipient on this site${which}.`, {
    errors: [{ line: null, field: "email", message: `already a recipient on this site${which}` }],
  });
}

/** Adds a recipient; an address already on the site is a conflict naming the field `email`. */
export async function addRecipient(siteId: number, input: RecipientCreateInput, actor: { label: string }, db: Db = getDb()): Promise<MailRecipient> {
  try {
    return await db.$transaction(async (tx) => {
      // Earlier rows (the demo seed, older versions) may hold capitals: compare without case.
      const same = await tx.mailRecipient.findFirst({ where: { siteId, email: { equals: input.email, mode: "insensitive" } }, select: { id: true } });
      if (same) throw duplicate(input.email, same.id);
      const r = await tx.mailRecipient.create({ data: { siteId, email: input.email, minLevel: input.minLevel, digest: input.digest } });
      await recordAudit(tx, { actor: actor.label, siteId, action: "recipient.create", entityType: "MailRecipient", entityId: String(r.id), after: r });
      return r;
    });
  } catch (err) {
    // Two adds of one address at the same moment: the unique (siteId, email) index refuses the second.
    if ((err as { code?: unknown }).code === "P2002") throw duplicate(input.email, null);
    throw err;
  }
}

export async function updateRecipient(siteId: number, id: number, patch: RecipientPatchInput, actor: { label: string }, db: Db = getDb()): Promise<MailRecipient> {
  return db.$transaction(async (tx) => {
    const before = await tx.mailRecipient.findFirst({ where: { id, siteId } });
    if (!before) throw notFound(id);
    const after = await tx.mailRecipient.update({ where: { id }, data: { minLevel: patch.minLevel ?? before.minLevel, digest: patch.digest ?? before.digest } });
    await recordAudit(tx, { actor: actor.label, siteId, action: "recipient.update", entityType: "MailRecipient", entityId: String(id), before, after });
    return after;
  });
}

/** Removes a recipient; returns the removed row. */
export async function removeRecipient(siteId: number, id: number, actor: { label: string }, db: Db = getDb()): Promise<MailRecipient> {
  return db.$transaction(async (tx) => {
    const before = await tx.mailRecipient.findFirst({ where: { id, siteId } });
    if (!before) throw notFound(id);
    await tx.mailRecipient.delete({ where: { id } });
    await recordAudit(tx, { actor: actor.label, siteId, action: "recipient.delete", entityType: "MailRecipient", entityId: String(id), before });
    return before;
  });
}
