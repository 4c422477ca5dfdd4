import { userRoute } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { UserUpdateBody, parseWith } from "@/lib/server/auth/schemas.ts";
import { updateUser, userJson } from "@/lib/server/users.ts";
import { AppError } from "@/lib/server/errors.ts";

export const dynamic = "force-dynamic";

function userIdParam(raw: string): number {
  const id = Number(raw);
  if (!Number.isInteger(id) || id <= 0) throw new AppError("not_found", `No user ${raw}.`);
  return id;
}

/** Changes a user: JSON {disabled?, isAdmin?, name?}. Disabling ends their sessions. */
export const PATCH = userRoute<{ id: string }>({ adminOnly: true }, async ({ req, params, actor }) => {
  const body = parseWith(UserUpdateBody, await readJsonBody(req, 4096));
  const u = await updateUser(userIdParam(params.id), body, actor);
  return Response.json({ user: userJson(u) });
});
