/**
 * API tokens: one site, one scope (`ingest` posts epochs and reads; `read` only reads). The
 * secret is shown once at creation; the database keeps hashSecret(secret) and a short prefix
 * (the first 12 characters, e.g. `ept_Ab3dE5gH`) so that people can tell tokens apart.
 */
import { getDb } from "../db/client.ts";
import { AppError } from "../errors.ts";
import { recordAudit } from "../audit.ts";
import { hashSecret, newSecret } from "./secrets.ts";
import type { TokenScope } from "./permissions.ts";

export const TOKEN_PREFIX_CHARS = 12;

/** Who did it: an Actor (its label is used) or a label such as `cli:alice`. */
export type ActorLike = string | { label: string };
export function actorLabel(a: ActorLike): string {
  return typeof a === "string" ? a : a.label;
}

export type TokenInfo = {
  id: number;
  siteId: number;
  scope: string;
  name: string;
  prefix: string;
  createdAt: Date;
  createdBy: string | null;
  revokedAt: Date | null;
  lastUsedAt: Date | null;
};

const infoSelect = { id: true, siteId: true, scope: true, name: true, prefix: true, createdAt: true, createdBy: true, revokedAt: true, lastUsedAt: true } as const;

export async function createToken(siteId: number, scope: TokenScope, name: string, actor: ActorLike): Promise<{ token: TokenInfo; secret: string }> {
  const secret = newSecret("ept");
  const prefix = secret.slice(0, TOKEN_PREFIX_CHARS);
  const label = actorLabel(actor);
  const token = await getDb().$transaction(async (tx) => {
    const t = await tx.apiToken.create({ data: { siteId, scope, name: name.trim(), tokenHash: hashSecret(secret), prefix, createdBy: label }, select: infoSelect });
    await recordAudit(tx, { actor: label, siteId, action: "token.create", entityType: "ApiToken", entityId: String(t.id), after: t });
    return t;
  });
  return { token, secret };
}

/** Revokes a token (kept for the record, refused from now on). `siteId` restricts it to one site. */
export async function revokeToken(id: number, actor: ActorLike, siteId?: number): Promise<TokenInfo> {
  const label = actorLabel(actor);
  return getDb().$transaction(async (tx) => {
    const before = await tx.apiToken.findUnique({ where: { id }, select: infoSelect });
    if (!before || (siteId !== undefined && before.siteId !== siteId)) throw new AppError("not_found", `No token ${id}${siteId !== undefined ? " on this site" : ""}.`);
    if (before.revokedAt) return before;
    const after = await tx.apiToken.update({ where: { id }, data: { revokedAt: new Date() }, select: infoSelect });
    await recordAudit(tx, { actor: label, siteId: before.siteId, action: "token.revoke", entityType: "ApiToken", entityId: String(id), before, after });
    return after;
  });
}

export async function listTokens(siteId: number): Promise<TokenInfo[]> {
  return getDb().apiToken.findMany({ where: { siteId }, select: infoSelect, orderBy: [{ revokedAt: { sort: "desc", nulls: "first" } }, { id: "desc" }] });
}

export function tokenJson(t: TokenInfo) {
  return {
    id: t.id,
    scope: t.scope,
    name: t.name,
    prefix: t.prefix,
    createdAt: t.createdAt.toISOString(),
    createdBy: t.createdBy,
    revokedAt: t.revokedAt?.toISOString() ?? null,
    lastUsedAt: t.lastUsedAt?.toISOString() ?? null,
  };
}
