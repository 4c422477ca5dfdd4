/**
 * The column mapping a site remembers for other people's CSV files (Site.columnMapping, JSON of
 * lib/formats/mapped-csv.ts ColumnMapping). Saving it is audited (`site.column-mapping`).
 */
import { getDb, type Db } from "../db/client.ts";
import type { Prisma } from "../db/generated/client.ts";
import { recordAudit } from "../audit.ts";
import type { Actor, SiteRow } from "../http/route.ts";
import { columnMappingSchema } from "../schemas/reports.ts";
import type { ColumnMapping } from "../../formats/mapped-csv.ts";

/** The saved mapping, or null (none saved, or one that no longer passes the schema). */
export async function getColumnMapping(siteId: number, db: Db = getDb()): Promise<ColumnMapping | null> {
  const s = await db.site.findUnique({ where: { id: siteId }, select: { columnMapping: true } });
  if (!s || s.columnMapping === null) return null;
  const r = columnMappingSchema.safeParse(s.columnMapping);
  return r.success ? (r.data as ColumnMapping) : null;
}

export async function saveColumnMapping(site: Pick<SiteRow, "id">, actor: Actor, mapping: ColumnMapping, db: Db = getDb()): Promise<ColumnMapping> {
  await db.$transaction(async (tx) => {
    const before = await tx.site.findUnique({ where: { id: site.id }, select: { columnMapping: true } });
    await tx.site.update({ where: { id: site.id }, data: { columnMapping: mapping as unknown as Prisma.InputJsonValue } });
    await recordAudit(tx, { actor: actor.label, siteId: site.id, action: "site.column-mapping", entityType: "Site", entityId: String(site.id), before: before?.columnMapping ?? null, after: mapping });
  });
  return mapping;
}
