import { siteRoute } from "@/lib/server/http/route.ts";
import { revokeToken, tokenJson } from "@/lib/server/auth/tokens.ts";
import { AppError } from "@/lib/server/errors.ts";

export const dynamic = "force-dynamic";

/** Revokes a token of this site (kept in the list as revoked). */
export const DELETE = siteRoute<{ slug: string; id: string }>("administer", async ({ params, site, actor }) => {
  const id = Number(params.id);
  if (!Number.isInteger(id) || id <= 0) throw new AppError("not_found", `No token ${params.id}.`);
  const t = await revokeToken(id, actor, site.id);
  return Response.json({ token: tokenJson(t) });
});
