import { openDatabaseUrl } from "../../db/connect.ts";
import { applyMigrations } from "../../db/migrate.ts";
import { getDb, closeDb } from "../../db/client.ts";
import { isAppError } from "../../errors.ts";
import { TOKEN_SCOPES, type TokenScope } from "../../auth/permissions.ts";
import { createToken, listTokens, revokeToken } from "../../auth/tokens.ts";
import { cliActor } from "./user.ts";

export const help = `Usage: epochal token <create|list|revoke> [options]

  create --site SLUG --scope ingest|read [--name N]
                 Create an API token for one site. The token is printed once, here; only its
                 hash is stored. ingest: post epochs (and read); read: read only.
                 Send it as: Authorization: Bearer <token>
  list --site SLUG
                 Tokens of the site: id, prefix, scope, name, created, last used, revoked.
  revoke --id N  Revoke a token (it stays in the list, refused from now on).

Uses DATABASE_URL when set, otherwise the embedded database. Changes are audited as cli:<os user>.`;

function opt(args: string[], name: string): string | null {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] !== undefined && !args[i + 1].startsWith("--") ? args[i + 1] : null;
}

function isScope(s: string): s is TokenScope {
  return (TOKEN_SCOPES as readonly string[]).includes(s);
}

export async function run(args: string[]): Promise<number> {
  const [sub, ...rest] = args;
  if (sub !== "create" && sub !== "list" && sub !== "revoke") {
    console.error(help);
    return 2;
  }
  const slug = opt(rest, "site");
  const scope = opt(rest, "scope");
  const idRaw = opt(rest, "id");
  if ((sub === "create" || sub === "list") && !slug) {
    console.error(`epochal token ${sub}: --site SLUG is required`);
    return 2;
  }
  if (sub === "create" && (!scope || !isScope(scope))) {
    console.error(`epochal token create: --scope must be ${TOKEN_SCOPES.join(" or ")}`);
    return 2;
  }
  const id = idRaw === null ? NaN : Number(idRaw);
  if (sub === "revoke" && !(Number.isInteger(id) && id > 0)) {
    console.error("epochal token revoke: --id N (a token number from `epochal token list`) is required");
    return 2;
  }
  const target = await openDatabaseUrl();
  try {
    await applyMigrations(target.url);
    const actor = cliActor();
    if (sub === "revoke") {
      const t = await revokeToken(id, actor);
      console.log(`token ${t.id} (${t.prefix}…) revoked`);
      return 0;
    }
    const site = await getDb().site.findUnique({ where: { slug: slug! }, select: { id: true, slug: true } });
    if (!site) {
      console.error(`epochal token ${sub}: --site: no site "${slug}"`);
      return 2;
    }
    if (sub === "create") {
      const r = await createToken(site.id, scope as TokenScope, opt(rest, "name") ?? "", actor);
      // The secret goes to stdout alone on its line so scripts can capture it; the note to stderr.
      console.error(`token ${r.token.id} for ${site.slug}, scope ${r.token.scope}; shown once, store it now:`);
      console.log(r.secret);
      return 0;
    }
    const tokens = await listTokens(site.id);
    if (!tokens.length) console.log(`no tokens on ${site.slug}`);
    for (const t of tokens) {
      const used = t.lastUsedAt ? t.lastUsedAt.toISOString() : "never used";
      console.log(`${String(t.id).padStart(4)}  ${t.prefix}…  ${t.scope.padEnd(6)} ${(t.name || "-").padEnd(20)} created ${t.createdAt.toISOString()}  ${used}${t.revokedAt ? `  revoked ${t.revokedAt.toISOString()}` : ""}`);
    }
    return 0;
  } catch (err) {
    if (isAppError(err)) {
      console.error(`epochal token ${sub}: ${err.message}`);
      return 2;
    }
    throw err;
  } finally {
    await closeDb();
    await target.detach();
  }
}
