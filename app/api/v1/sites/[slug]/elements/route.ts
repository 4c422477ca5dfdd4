import { siteRoute } from "@/lib/server/http/route.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { createElement, generateElements, listElements } from "@/lib/server/elements.ts";
import { ElementGenerateSchema, ElementManualSchema, parseOrThrow, readJsonBody } from "@/lib/server/schemas/elements.ts";

export const dynamic = "force-dynamic";

/** The site's elements; `?includeDisabled=1` adds the disabled ones. */
export const GET = siteRoute<{ slug: string }>("read", async ({ req, site }) => {
  const includeDisabled = ["1", "true"].includes(new URL(req.url).searchParams.get("includeDisabled") ?? "");
  return Response.json({ elements: await listElements(getDb(), site, { includeDisabled }) });
});

/** One element by hand ({name, label?, kind, mode?, points, referenceEpochId?}) or the triangulation ({generate: {...}}). */
export const POST = siteRoute<{ slug: string }>("manage-elements", async ({ req, site, actor }) => {
  const body = await readJsonBody(req);
  if (body !== null && typeof body === "object" && "generate" in body) {
    const { generate } = parseOrThrow(ElementGenerateSchema, body, "triangulation options");
    const r = await generateElements(getDb(), site, actor, generate);
    return Response.json(
      { created: r.created, skipped: r.skipped, dropped: r.preview.dropped, skippedPoints: r.preview.skippedPoints, quality: r.preview.quality, resultsWritten: r.resultsWritten },
      { status: 201 },
    );
  }
  const input = parseOrThrow(ElementManualSchema, body, "element");
  const r = await createElement(getDb(), site, actor, input);
  return Response.json({ element: r.element, resultsWritten: r.resultsWritten }, { status: 201 });
});
