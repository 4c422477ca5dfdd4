import { siteRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { parseWith } from "@/lib/server/auth/schemas.ts";
import { AppError } from "@/lib/server/errors.ts";
import { RulePatchBody } from "@/lib/server/schemas/rules.ts";
import { getRule, ruleJson, updateRule } from "@/lib/server/rules.ts";

export const dynamic = "force-dynamic";

function ruleId(raw: string): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw new AppError("not_found", `No rule ${raw}.`);
  return id;
}

export const GET = siteRoute<{ slug: string; id: string }>("read", async ({ params, site }) => {
  const rule = await getRule(site.id, ruleId(params.id));
  return Response.json({ rule: ruleJson(rule) }, { headers: { "Cache-Control": "no-store" } });
});

/** Edits a rule; {enabled: false} disables it (rules are never deleted). */
export const PATCH = siteRoute<{ slug: string; id: string }>("manage-rules", async ({ req, params, site, actor }) => {
  const body = parseWith(RulePatchBody, await readJsonBody(req));
  const rule = await updateRule(site.id, ruleId(params.id), body, actor);
  return Response.json({ rule: ruleJson(rule) }, { headers: { "Cache-Control": "no-store" } });
});
