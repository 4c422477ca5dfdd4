import { checkHealth } from "@/lib/server/health.ts";

export const dynamic = "force-dynamic";

export async function GET(): Promise<Response> {
  const h = await checkHealth();
  return Response.json(h, { status: h.database.state === "up" ? 200 : 503, headers: { "Cache-Control": "no-store" } });
}
