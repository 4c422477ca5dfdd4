/**
 * The header on every signed-in page: product name, Sites, Alerts, Admin (administrators only),
 * the account's e-mail and Sign out (a POST form; works without JavaScript). Server component:
 * it reads the session itself. The root layout (app/layout.tsx) renders it on every page.
 * Links do not prefetch: a site team keeps one page open, and prefetches of the other sections
 * would compete with the plan's own data on every load.
 */
import Link from "next/link";
import { currentUser } from "@/app/_server/auth.ts";
import { signOutAction } from "@/app/_server/session-actions.ts";

export async function TopBar() {
  const user = await currentUser();
  return (
    <header className="topbar">
      <Link prefetch={false} href="/" className="topbar-brand">
        Epochal
      </Link>
      <nav aria-label="Main" className="topbar-nav">
        {user ? (
          <>
            <Link prefetch={false} href="/sites">Sites</Link>
            <Link prefetch={false} href="/alerts">Alerts</Link>
            {user.isAdmin ? <Link prefetch={false} href="/admin">Admin</Link> : null}
          </>
        ) : null}
      </nav>
      <div className="topbar-user">
        {user ? (
          <>
            <Link prefetch={false} href="/account" title="Your account">
              {user.email}
            </Link>
            <form action={signOutAction}>
              <button type="submit" className="secondary small">
                Sign out
              </button>
            </form>
          </>
        ) : (
          <Link prefetch={false} href="/sign-in">Sign in</Link>
        )}
      </div>
    </header>
  );
}

export default TopBar;
