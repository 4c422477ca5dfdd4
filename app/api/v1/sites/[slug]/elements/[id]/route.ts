import { siteRoute } from "@/lib/server/http/route.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { disableElement, getElement, parseElementId, updateElement } from "@/lib/server/elements.ts";
import { ElementPatchSchema, parseOrThrow, readJsonBody } from "@/lib/server/schemas/elements.ts";

export const dynamic = "force-dynamic";
type P = { slug: string; id: string };

export const GET = siteRoute<P>("read", async ({ params, site }) => Response.json({ element: await getElement(getDb(), site, parseElementId(params.id)) }));

/** name, label, referenceEpochId (re-baseline; null = back to the site's), disabled. */
export const PATCH = siteRoute<P>("manage-elements", async ({ req, params, site, actor }) => {
  const patch = parseOrThrow(ElementPatchSchema, await readJsonBody(req), "element change");
  const r = await updateElement(getDb(), site, actor, parseElementId(params.id), patch);
  return Response.json({ element: r.element, resultsWritten: r.resultsWritten });
});

/** Disables the element; its results are kept. */
export const DELETE = siteRoute<P>("manage-elements", async ({ params, site, actor }) =>
  Response.json({ element: await disableElement(getDb(), site, actor, parseElementId(params.id)) }),
);
