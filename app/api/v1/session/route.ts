import { publicRoute, userRoute, readCookie } from "@/lib/server/http/route.ts";
import { readJsonBody } from "@/lib/server/http/body.ts";
import { assertOriginIfPresent, setSessionCookieHeader } from "@/lib/server/http/session-http.ts";
import { SignInBody, parseWith } from "@/lib/server/auth/schemas.ts";
import { clientAddress, signIn } from "@/lib/server/auth/signin.ts";
import { deleteSession } from "@/lib/server/auth/sessions.ts";
import { SESSION_COOKIE } from "@/lib/server/auth/secrets.ts";
import { recordAudit } from "@/lib/server/audit.ts";
import { getDb } from "@/lib/server/db/client.ts";

export const dynamic = "force-dynamic";

/** Sign in: JSON {email, password} → 200 {user} and the session cookie; 401 wrong; 429 rate limited. */
export const POST = publicRoute(async ({ req }) => {
  assertOriginIfPresent(req);
  const body = parseWith(SignInBody, await readJsonBody(req, 4096));
  const r = await signIn({ email: body.email, password: body.password, address: clientAddress(req.headers) });
  return Response.json(
    { user: { id: r.user.id, email: r.user.email, name: r.user.name, isAdmin: r.user.isAdmin }, expiresAt: r.session.expiresAt.toISOString() },
    { headers: { "Set-Cookie": setSessionCookieHeader(req, r.session), "Cache-Control": "no-store" } },
  );
});

/** Sign out: ends this session and clears the cookie. */
export const DELETE = userRoute({}, async ({ req, actor }) => {
  const secret = readCookie(req, SESSION_COOKIE);
  if (secret) await deleteSession(secret);
  await recordAudit(getDb(), { actor: actor.label, action: "session.delete", entityType: "User", entityId: String(actor.userId) });
  return new Response(null, { status: 204, headers: { "Set-Cookie": setSessionCookieHeader(req, null), "Cache-Control": "no-store" } });
});
