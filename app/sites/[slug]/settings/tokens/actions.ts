"use server";
/** Token actions for a site's administrators; each one checks the role on the server again. */
import { revalidatePath } from "next/cache";
import { createToken, revokeToken } from "@/lib/server/auth/tokens.ts";
import { TokenCreateBody, parseWith } from "@/lib/server/auth/schemas.ts";
import { isAppError } from "@/lib/server/errors.ts";
import { requireSiteRole } from "@/app/_server/auth.ts";

export type CreateTokenState = { secret: string; prefix: string; scope: string; name: string } | { error: string } | null;

export async function createTokenAction(slug: string, _prev: CreateTokenState, fd: FormData): Promise<CreateTokenState> {
  const { user, site } = await requireSiteRole(slug, "administer", `/sites/${slug}/settings/tokens`);
  try {
    const body = parseWith(TokenCreateBody, { scope: String(fd.get("scope") ?? ""), name: String(fd.get("name") ?? "").slice(0, 200) });
    const r = await createToken(site.id, body.scope, body.name, user);
    revalidatePath(`/sites/${slug}/settings/tokens`);
    // Returned to this one response only; never stored or logged.
    return { secret: r.secret, prefix: r.token.prefix, scope: r.token.scope, name: r.token.name };
  } catch (err) {
    if (isAppError(err)) return { error: "Choose a scope (ingest or read) and a name of at most 100 characters." };
    throw err;
  }
}

export async function revokeTokenAction(slug: string, fd: FormData): Promise<void> {
  const { user, site } = await requireSiteRole(slug, "administer", `/sites/${slug}/settings/tokens`);
  const id = Number(fd.get("tokenId"));
  if (Number.isInteger(id) && id > 0) await revokeToken(id, user, site.id);
  revalidatePath(`/sites/${slug}/settings/tokens`);
}
