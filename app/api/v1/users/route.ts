import { userRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { UserCreateBody, parseWith } from "@/lib/server/auth/schemas.ts";
import { createUser, listUsers, userJson } from "@/lib/server/users.ts";

export const dynamic = "force-dynamic";

export const GET = userRoute({ adminOnly: true }, async () => {
  const users = await listUsers();
  return Response.json({ users: users.map((u) => userJson(u, u.memberships)) }, { headers: { "Cache-Control": "no-store" } });
});

/** Creates a user: JSON {email, name, password, isAdmin?} → 201. */
export const POST = userRoute({ adminOnly: true }, async ({ req, actor }) => {
  const body = parseWith(UserCreateBody, await readJsonBody(req, 8192));
  const u = await createUser(body, actor);
  return Response.json({ user: userJson(u, []) }, { status: 201 });
});
