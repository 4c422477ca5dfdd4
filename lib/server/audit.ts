/**
 * The audit log: one append-only row per change (who, when, what, the value before and after).
 * The database refuses UPDATE and DELETE on "AuditEntry" (rules in the init migration), so the log
 * can only grow. Call `recordAudit` inside the same transaction as the change it describes, so a
 * change without its audit row (or the reverse) cannot be committed.
 *
 *   await db.$transaction(async (tx) => {
 *     const el = await tx.element.update({ ... });
 *     await recordAudit(tx, { actor: actor.label, siteId, action: "element.update", entityType: "Element",
 *       entityId: String(el.id), before, after: el });
 *   });
 *
 * `actor` is the Actor label: `user:<email>`, `token:<prefix>`, or `cli:<os user>` / `system`.
 * `action` is `<entity>.<verb>` in lower case (e.g. `epoch.upload`, `alert.acknowledge`, `user.create`).
 * Secrets never go into `before`/`after`: `auditSafe` drops the usual secret-bearing fields.
 */
import type { Db } from "./db/client.ts";
import type { Prisma } from "./db/generated/client.ts";

/** A Prisma transaction client or the client itself: anything with the `auditEntry` delegate. */
export type AuditWriter = Pick<Db, "auditEntry"> | Prisma.TransactionClient;

export type AuditInput = {
  actor: string;
  siteId?: number | null;
  action: string;
  entityType: string;
  entityId?: string | null;
  before?: unknown;
  after?: unknown;
};

const SECRET_KEYS = new Set(["passwordHash", "password", "tokenHash", "token", "secret", "newPassword", "currentPassword"]);

/** A JSON-safe copy without secret-bearing fields; Dates become ISO strings, bigints strings. */
export function auditSafe(value: unknown): Prisma.InputJsonValue | null {
  if (value === undefined || value === null) return null;
  const json = JSON.stringify(value, (k, v: unknown) => {
    if (SECRET_KEYS.has(k)) return undefined;
    if (typeof v === "bigint") return v.toString();
    return v;
  });
  return json === undefined ? null : (JSON.parse(json) as Prisma.InputJsonValue);
}

export async function recordAudit(tx: AuditWriter, input: AuditInput): Promise<void> {
  const before = auditSafe(input.before);
  const after = auditSafe(input.after);
  await tx.auditEntry.create({
    data: {
      actor: input.actor,
      siteId: input.siteId ?? null,
      action: input.action,
      entityType: input.entityType,
      entityId: input.entityId ?? null,
      // Prisma needs the JsonNull sentinel to store SQL NULL in a Json? column; leaving the field out does the same.
      ...(before === null ? {} : { before }),
      ...(after === null ? {} : { after }),
    },
  });
}

export type AuditRow = {
  id: string;
  at: Date;
  actor: string;
  siteId: number | null;
  siteSlug: string | null;
  action: string;
  entityType: string;
  entityId: string | null;
  before: unknown;
  after: unknown;
};

/** Newest first. `siteId` undefined: all; null: only entries without a site (users, global). */
export async function listAudit(db: Db, opts: { siteId?: number | null; limit?: number; beforeId?: bigint } = {}): Promise<AuditRow[]> {
  const rows = await db.auditEntry.findMany({
    where: {
      ...(opts.siteId === undefined ? {} : { siteId: opts.siteId }),
      ...(opts.beforeId === undefined ? {} : { id: { lt: opts.beforeId } }),
    },
    orderBy: { id: "desc" },
    take: opts.limit ?? 200,
  });
  const siteIds = [...new Set(rows.map((r) => r.siteId).filter((x): x is number => x !== null))];
  const sites = siteIds.length ? await db.site.findMany({ where: { id: { in: siteIds } }, select: { id: true, slug: true } }) : [];
  const slugOf = new Map(sites.map((s) => [s.id, s.slug]));
  return rows.map((r) => ({
    id: r.id.toString(),
    at: r.at,
    actor: r.actor,
    siteId: r.siteId,
    siteSlug: r.siteId === null ? null : (slugOf.get(r.siteId) ?? null),
    action: r.action,
    entityType: r.entityType,
    entityId: r.entityId,
    before: r.before,
    after: r.after,
  }));
}

/** RFC 4180 field: quoted when it holds a comma, quote, CR or LF; formula-leading characters neutralised. */
function csvField(v: string): string {
  // A cell starting with = + - @ would run as a formula in a spreadsheet (CSV injection): prefix a quote.
  const safe = /^[=+\-@\t\r]/.test(v) ? `'${v}` : v;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/**
 * Audit CSV columns (documented in the admin audit page):
 *   id          entry number (increasing)
 *   at_utc      ISO 8601 time in UTC (`Z`), millisecond precision
 *   actor       `user:<email>`, `token:<prefix>`, `cli:<name>` or `system`
 *   site        site slug, empty for changes not tied to a site
 *   action      `<entity>.<verb>`
 *   entity_type, entity_id
 *   before, after  JSON of the previous and new value (SI units as stored: metres, dimensionless strain)
 */
export const AUDIT_CSV_COLUMNS = ["id", "at_utc", "actor", "site", "action", "entity_type", "entity_id", "before", "after"] as const;

export function auditCsvRow(r: AuditRow): string {
  const cells = [
    r.id,
    r.at.toISOString(),
    r.actor,
    r.siteSlug ?? "",
    r.action,
    r.entityType,
    r.entityId ?? "",
    r.before === null || r.before === undefined ? "" : JSON.stringify(r.before),
    r.after === null || r.after === undefined ? "" : JSON.stringify(r.after),
  ];
  return cells.map(csvField).join(",");
}

/** The whole (filtered) log as CSV, oldest first, paging through the table in id order. */
export async function auditCsv(db: Db, opts: { siteId?: number | null } = {}): Promise<string> {
  const lines: string[] = [AUDIT_CSV_COLUMNS.join(",")];
  const pageRows: AuditRow[] = [];
  let beforeId: bigint | undefined;
  for (;;) {
    const page = await listAudit(db, { siteId: opts.siteId, limit: 5000, beforeId });
    if (page.length === 0) break;
    pageRows.push(...page);
    beforeId = BigInt(page[page.length - 1].id);
    if (page.length < 5000) break;
  }
  for (let i = pageRows.length - 1; i >= 0; i--) lines.push(auditCsvRow(pageRows[i]));
  return lines.join("\r\n") + "\r\n";
}
