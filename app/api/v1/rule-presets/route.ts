import { userRoute } from "@/lib/server/http/route.ts";
import { RULE_PRESETS } from "@/lib/triggers/presets.ts";

export const dynamic = "force-dynamic";

/** Rule presets from the literature, each with its source and the caution (levels dimensionless). */
export const GET = userRoute({}, async () => {
  return Response.json({ presets: RULE_PRESETS });
});
