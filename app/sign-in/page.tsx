import type { Metadata } from "next";
import { redirect } from "next/navigation";
import { currentUser, safeNext } from "@/app/_server/auth.ts";
import { signInAction } from "@/app/_server/session-actions.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Sign in" };

type Search = Promise<Record<string, string | string[] | undefined>>;

function one(v: string | string[] | undefined): string | undefined {
  return Array.isArray(v) ? v[0] : v;
}

export default async function SignInPage({ searchParams }: { searchParams: Search }) {
  const sp = await searchParams;
  const next = safeNext(one(sp.next));
  if (await currentUser()) redirect(next);
  const error = one(sp.error);
  const waitS = Number(one(sp.wait) ?? 0);
  const message =
    error === "wrong"
      ? "E-mail or password is wrong, or the account is disabled."
      : error === "limited"
        ? `Too many failed sign-ins. Try again in ${Math.max(1, Math.ceil(waitS / 60))} minute(s).`
        : error === "missing"
          ? "Enter your e-mail address and password."
          : null;
  return (
    <main id="main">
      <div className="panel auth-card">
        <h1>Sign in to Epochal</h1>
        {one(sp.signedOut) ? <p className="notice">You are signed out.</p> : null}
        {message ? (
          <p className="notice bad" role="alert" id="sign-in-error">
            {message}
          </p>
        ) : null}
        <form action={signInAction} aria-describedby={message ? "sign-in-error" : undefined}>
          <input type="hidden" name="next" value={next} />
          <label htmlFor="email">E-mail</label>
          <input id="email" name="email" type="email" autoComplete="username" required autoFocus defaultValue={one(sp.email) ?? ""} maxLength={254} />
          <label htmlFor="password">Password</label>
          <input id="password" name="password" type="password" autoComplete="current-password" required maxLength={500} />
          <button type="submit">Sign in</button>
        </form>
        <p className="muted">Accounts are created by an administrator. Forgotten password: ask your administrator to reset it.</p>
      </div>
    </main>
  );
}
