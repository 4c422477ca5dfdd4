"use server";
/**
 * Sign-in and sign-out as server actions (plain HTML forms, work without JavaScript). Next
 * refuses a server action whose Origin header names another host than Host / X-Forwarded-Host
 * (action-handler.js, "Invalid Server Actions request"), and the session cookie is SameSite=Lax,
 * so a cross-site form cannot act with the user's session.
 */
import { redirect } from "next/navigation";
import { clientAddress, signIn } from "@/lib/server/auth/signin.ts";
import { deleteSession } from "@/lib/server/auth/sessions.ts";
import { isAppError } from "@/lib/server/errors.ts";
import { recordAudit } from "@/lib/server/audit.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { currentUser, requestHeaders, safeNext, sessionSecret, setSessionCookie } from "./auth.ts";

function field(fd: FormData, name: string, max: number): string {
  const v = fd.get(name);
  return typeof v === "string" ? v.slice(0, max) : "";
}

export async function signInAction(fd: FormData): Promise<void> {
  const email = field(fd, "email", 254).trim();
  const password = field(fd, "password", 500);
  const next = safeNext(field(fd, "next", 500));
  const back = (error: string, extra = "") =>
    `/sign-in?error=${error}&next=${encodeURIComponent(next)}&email=${encodeURIComponent(email)}${extra}`;
  if (!email || !password) redirect(back("missing"));
  let target: string;
  try {
    const r = await signIn({ email, password, address: clientAddress(await requestHeaders()) });
    await setSessionCookie(r.session);
    target = next;
  } catch (err) {
    if (!isAppError(err)) throw err;
    if (err.code === "rate_limited") target = back("limited", `&wait=${Number(err.details?.retryAfterS ?? 900)}`);
    else target = back("wrong");
  }
  redirect(target);
}

export async function signOutAction(): Promise<void> {
  const user = await currentUser();
  const secret = await sessionSecret();
  if (secret) await deleteSession(secret);
  if (user) await recordAudit(getDb(), { actor: user.label, action: "session.delete", entityType: "User", entityId: String(user.userId) });
  await setSessionCookie(null);
  redirect("/sign-in?signedOut=1");
}
