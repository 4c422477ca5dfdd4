import type { Metadata } from "next";
import Link from "next/link";
import { requireUser, safeNext } from "@/app/_server/auth.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Not allowed" };

type Search = Promise<Record<string, string | string[] | undefined>>;

/** Where pages send a signed-in user whose role does not allow what they asked for (403 for pages). */
export default async function DeniedPage({ searchParams }: { searchParams: Search }) {
  await requireUser("/account");
  const sp = await searchParams;
  const need = typeof sp.need === "string" ? sp.need.slice(0, 40) : "a higher role";
  const site = typeof sp.site === "string" ? sp.site.slice(0, 100) : null;
  const from = safeNext(typeof sp.from === "string" ? sp.from : null, "/");
  return (
    <main id="main">
      <h1>Not allowed</h1>
      <p className="notice bad" role="alert">
        Your role {site ? <>on site “{site}” </> : null}does not allow this page (it needs: {need}). Ask an administrator if you need it.
      </p>
      <p>
        <Link href={site ? `/sites/${encodeURIComponent(site)}` : "/"}>Back</Link> · <span className="muted">requested: {from}</span>
      </p>
    </main>
  );
}
