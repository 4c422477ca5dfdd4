import { userRoute } from "@/lib/server/http/route.ts";
import { findUserByEmail, membershipsOf, userJson } from "@/lib/server/users.ts";
import { AppError } from "@/lib/server/errors.ts";

export const dynamic = "force-dynamic";

/** The signed-in user and their roles per site. */
export const GET = userRoute({}, async ({ actor }) => {
  const u = await findUserByEmail(actor.email);
  if (!u) throw new AppError("unauthenticated", "Sign in first.");
  return Response.json({ user: userJson(u, await membershipsOf(u.id)) }, { headers: { "Cache-Control": "no-store" } });
});
