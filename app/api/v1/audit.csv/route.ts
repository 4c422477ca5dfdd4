import { userRoute } from "@/lib/server/http/route.ts";
import { auditCsv } from "@/lib/server/audit.ts";
import { AppError } from "@/lib/server/errors.ts";
import { getDb } from "@/lib/server/db/client.ts";

export const dynamic = "force-dynamic";

/**
 * The audit log as CSV (RFC 4180, UTF-8, CRLF), oldest first; ?site=slug restricts it to one site.
 * Columns: id, at_utc (ISO 8601, Z), actor, site, action, entity_type, entity_id, before, after (JSON).
 */
export const GET = userRoute({ adminOnly: true }, async ({ req }) => {
  const slug = new URL(req.url).searchParams.get("site");
  const db = getDb();
  let siteId: number | undefined;
  if (slug) {
    const site = await db.site.findUnique({ where: { slug }, select: { id: true } });
    if (!site) throw new AppError("not_found", `No site "${slug}".`);
    siteId = site.id;
  }
  const csv = await auditCsv(db, { siteId });
  const name = `epochal-audit${slug ? "-" + slug.replace(/[^a-z0-9-]/gi, "") : ""}.csv`;
  return new Response(csv, {
    headers: { "Content-Type": "text/csv; charset=utf-8", "Content-Disposition": `attachment; filename="${name}"`, "Cache-Control": "no-store" },
  });
});
