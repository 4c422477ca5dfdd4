import { siteRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { parseWith } from "@/lib/server/auth/schemas.ts";
import { RuleCreateBody } from "@/lib/server/schemas/rules.ts";
import { createRule, listRules, ruleJson } from "@/lib/server/rules.ts";

export const dynamic = "force-dynamic";

/** The site's trigger rules, enabled and disabled (levels dimensionless, in the compared sense). */
export const GET = siteRoute("read", async ({ site }) => {
  const rules = await listRules(site.id);
  return Response.json({ rules: rules.map(ruleJson) }, { headers: { "Cache-Control": "no-store" } });
});

/** Creates a rule: {name, elementIds, quantity?, preset?, reviewLevel?, alertLevel?, limitLevel?, …} → 201. */
export const POST = siteRoute("manage-rules", async ({ req, site, actor }) => {
  const body = parseWith(RuleCreateBody, await readJsonBody(req));
  const rule = await createRule(site.id, body, actor);
  return Response.json({ rule: ruleJson(rule) }, { status: 201, headers: { "Cache-Control": "no-store" } });
});
