import { siteRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { TokenCreateBody, parseWith } from "@/lib/server/auth/schemas.ts";
import { createToken, listTokens, tokenJson } from "@/lib/server/auth/tokens.ts";

export const dynamic = "force-dynamic";

/** The site's API tokens (never their secrets), with last use. */
export const GET = siteRoute("administer", async ({ site }) => {
  const tokens = await listTokens(site.id);
  return Response.json({ tokens: tokens.map(tokenJson) }, { headers: { "Cache-Control": "no-store" } });
});

/** Creates a token: JSON {scope: ingest|read, name?} → 201 with `secret`, shown this once only. */
export const POST = siteRoute("administer", async ({ req, site, actor }) => {
  const body = parseWith(TokenCreateBody, await readJsonBody(req, 4096));
  const r = await createToken(site.id, body.scope, body.name, actor);
  return Response.json({ token: tokenJson(r.token), secret: r.secret }, { status: 201, headers: { "Cache-Control": "no-store" } });
});
