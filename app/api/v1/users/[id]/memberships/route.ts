import { userRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { MembershipBody, parseWith } from "@/lib/server/auth/schemas.ts";
import { grantRole, membershipsOf } from "@/lib/server/users.ts";
import { AppError } from "@/lib/server/errors.ts";
import { getDb } from "@/lib/server/db/client.ts";

export const dynamic = "force-dynamic";

/** Grants a role on a site: JSON {site: slug, role: viewer|surveyor|engineer|admin|null (removes)}. */
export const POST = userRoute<{ id: string }>({ adminOnly: true }, async ({ req, params, actor }) => {
  const id = Number(params.id);
  if (!Number.isInteger(id) || id <= 0) throw new AppError("not_found", `No user ${params.id}.`);
  const body = parseWith(MembershipBody, await readJsonBody(req, 4096));
  const site = await getDb().site.findUnique({ where: { slug: body.site }, select: { id: true } });
  if (!site) throw new AppError("invalid", `No site "${body.site}".`, { errors: [{ line: null, field: "site", message: "Unknown site." }] });
  await grantRole(id, site.id, body.role, actor);
  const ms = await membershipsOf(id);
  return Response.json({ memberships: ms.map((m) => ({ site: m.siteSlug, siteName: m.siteName, role: m.role })) });
});
