import { createInterface } from "node:readline";
import { userInfo } from "node:os";
import { openDatabaseUrl } from "../../db/connect.ts";
import { applyMigrations } from "../../db/migrate.ts";
import { getDb, closeDb } from "../../db/client.ts";
import { isAppError } from "../../errors.ts";
import { isRole, ROLES } from "../../auth/permissions.ts";
import { passwordProblem } from "../../auth/password.ts";
import { createUser, findUserByEmail, grantRole, listUsers, resetPassword, updateUser } from "../../users.ts";

export const help = `Usage: epochal user <create|grant|list|disable|enable|set-password> [options]

  create --email E --name N [--admin] [--password P]
                 Create a user (--admin: global administrator, all sites). The password comes
                 from --password, else EPOCHAL_PASSWORD, else a prompt (hidden) on a terminal.
                 At least 10 characters, at most 72 bytes.
  grant --email E --site SLUG --role viewer|surveyor|engineer|admin|none
                 Set the user's role on a site (none removes it).
  list           Users, their roles per site, and whether they are disabled.
  disable --email E / enable --email E
                 Disabling ends the user's sessions; the account is kept for the record.
  set-password --email E [--password P]
                 Reset a password (same sources as create); ends all the user's sessions.

The first administrator can also come from the environment at the first start:
EPOCHAL_ADMIN_EMAIL and EPOCHAL_ADMIN_PASSWORD (used only while no user exists).
Uses DATABASE_URL when set, otherwise the embedded database. Changes are audited as cli:<os user>.`;

function opts(args: string[]): Map<string, string | true> {
  const m = new Map<string, string | true>();
  for (let i = 0; i < args.length; i++) {
    const a = args[i];
    if (!a.startsWith("--")) continue;
    const next = args[i + 1];
    if (next !== undefined && !next.startsWith("--")) {
      m.set(a.slice(2), next);
      i++;
    } else m.set(a.slice(2), true);
  }
  return m;
}

function str(o: Map<string, string | true>, k: string): string | null {
  const v = o.get(k);
  return typeof v === "string" ? v : null;
}

async function promptHidden(question: string): Promise<string> {
  const rl = createInterface({ input: process.stdin, output: process.stdout, terminal: true });
  const rlw = rl as unknown as { _writeToOutput: (s: string) => void; output: NodeJS.WritableStream };
  let asked = false;
  rlw._writeToOutput = (s: string) => {
    if (!asked) {
      process.stdout.write(s);
      asked = true;
    }
  };
  return new Promise((ok) =>
    rl.question(question, (answer) => {
      rl.close();
      process.stdout.write("\n");
      ok(answer);
    }),
  );
}

async function passwordFrom(o: Map<string, string | true>): Promise<string | null> {
  const p = str(o, "password") ?? process.env.EPOCHAL_PASSWORD ?? null;
  if (p !== null) return p;
  if (!process.stdin.isTTY) return null;
  const a = await promptHidden("Password: ");
  const b = await promptHidden("Repeat password: ");
  if (a !== b) {
    console.error("epochal user: the passwords differ");
    return null;
  }
  return a;
}

export function cliActor(): string {
  let name = "unknown";
  try {
    name = userInfo().username;
  } catch {
    /* no passwd entry */
  }
  return `cli:${name}`;
}

export async function run(args: string[]): Promise<number> {
  const [sub, ...rest] = args;
  const o = opts(rest);
  if (!["create", "grant", "list", "disable", "enable", "set-password"].includes(sub ?? "")) {
    console.error(help);
    return 2;
  }
  const email = str(o, "email");
  if (sub !== "list" && !email) {
    console.error(`epochal user ${sub}: --email is required`);
    return 2;
  }
  let password: string | null = null;
  if (sub === "create" || sub === "set-password") {
    password = await passwordFrom(o);
    if (password === null) {
      console.error(`epochal user ${sub}: give --password, set EPOCHAL_PASSWORD, or run on a terminal to be asked`);
      return 2;
    }
    const problem = passwordProblem(password);
    if (problem) {
      console.error(`epochal user ${sub}: --password: ${problem}`);
      return 2;
    }
  }
  if (sub === "create" && !str(o, "name")) {
    console.error("epochal user create: --name is required");
    return 2;
  }
  const role = str(o, "role");
  if (sub === "grant") {
    if (!str(o, "site") || !role || !(role === "none" || isRole(role))) {
      console.error(`epochal user grant: --site SLUG and --role ${ROLES.join("|")}|none are required`);
      return 2;
    }
  }
  const target = await openDatabaseUrl();
  try {
    await applyMigrations(target.url);
    const actor = cliActor();
    if (sub === "list") {
      const users = await listUsers();
      if (!users.length) console.log("no users");
      for (const u of users) {
        const roles = u.isAdmin ? "administrator (all sites)" : u.memberships.map((m) => `${m.siteSlug}:${m.role}`).join(" ") || "no site";
        console.log(`${String(u.id).padStart(4)}  ${u.email.padEnd(32)} ${u.name.padEnd(24)} ${roles}${u.disabledAt ? "  [disabled]" : ""}`);
      }
      return 0;
    }
    if (sub === "create") {
      const u = await createUser({ email: email!, name: str(o, "name")!, password: password!, isAdmin: o.get("admin") === true }, actor);
      console.log(`created user ${u.id} ${u.email}${u.isAdmin ? " (administrator)" : ""}`);
      return 0;
    }
    const u = await findUserByEmail(email!);
    if (!u) {
      console.error(`epochal user ${sub}: no user with e-mail ${email}`);
      return 2;
    }
    if (sub === "grant") {
      const site = await getDb().site.findUnique({ where: { slug: str(o, "site")! }, select: { id: true, slug: true } });
      if (!site) {
        console.error(`epochal user grant: --site: no site "${str(o, "site")}"`);
        return 2;
      }
      await grantRole(u.id, site.id, role === "none" ? null : (role as (typeof ROLES)[number]), actor);
      console.log(role === "none" ? `removed ${u.email} from ${site.slug}` : `${u.email} is ${role} on ${site.slug}`);
      return 0;
    }
    if (sub === "disable" || sub === "enable") {
      await updateUser(u.id, { disabled: sub === "disable" }, actor);
      console.log(`${u.email} ${sub}d`);
      return 0;
    }
    await resetPassword(u.id, password!, actor);
    console.log(`password of ${u.email} set; their sessions ended`);
    return 0;
  } catch (err) {
    if (isAppError(err)) {
      console.error(`epochal user ${sub}: ${err.message}`);
      return 2;
    }
    throw err;
  } finally {
    await closeDb();
    await target.detach();
  }
}
