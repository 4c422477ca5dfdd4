import { userRoute, readCookie } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { PasswordChangeBody, parseWith } from "@/lib/server/auth/schemas.ts";
import { SESSION_COOKIE } from "@/lib/server/auth/secrets.ts";
import { changePassword } from "@/lib/server/users.ts";

export const dynamic = "force-dynamic";

/** Password change: JSON {currentPassword, newPassword}; ends the user's other sessions. */
export const POST = userRoute({}, async ({ req, actor }) => {
  const body = parseWith(PasswordChangeBody, await readJsonBody(req, 4096));
  const r = await changePassword(actor.userId, body.currentPassword, body.newPassword, readCookie(req, SESSION_COOKIE));
  return Response.json({ ok: true, endedSessions: r.endedSessions }, { headers: { "Cache-Control": "no-store" } });
});
