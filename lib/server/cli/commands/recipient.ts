/**
 * `epochal recipient list|add|update|remove`: who gets the alert mails of a site, from which level,
 * and whether as a digest. Same service, checks and audit rows as the API and the set-up page.
 */
import { openDatabaseUrl } from "../../db/connect.ts";
import { applyMigrations } from "../../db/migrate.ts";
import { getDb, closeDb } from "../../db/client.ts";
import { isAppError, type AppError } from "../../errors.ts";
import { parseWith } from "../../auth/schemas.ts";
import { RecipientCreateBody, RecipientPatchBody } from "../../schemas/recipients.ts";
import { addRecipient, findRecipientByEmail, listRecipients, removeRecipient, updateRecipient } from "../../mail/recipients.ts";
import type { MailRecipient } from "../../db/generated/client.ts";
import { cliActor } from "./user.ts";
import { parseOptions, UsageError } from "../options.ts";

export const help = `Usage: epochal recipient <list|add|update|remove> --site SLUG [options]

  list   --site SLUG [--json]
                 The site's mail recipients: id, address, minimum level, digest or immediate.
  add    --site SLUG --email ADDRESS [--min-level review|alert|limit] [--digest]
                 Mail ADDRESS when an alert reaches the level (default review): each event at
                 once, or with --digest one mail per digest period listing the events.
  update --site SLUG (--email ADDRESS | --id N) [--min-level L] [--digest | --immediate]
                 Change the minimum level, or switch between digest and immediate mails.
  remove --site SLUG (--email ADDRESS | --id N)
                 Stop mailing the recipient (mails already written keep their recipients).

Uses DATABASE_URL when set, otherwise the embedded database. Changes are audited as cli:<os user>.
Exit status 2 on bad input (the message names the option).`;

const SUBS = ["list", "add", "update", "remove"] as const;
type Sub = (typeof SUBS)[number];
const VALUED = ["--site", "--email", "--id", "--min-level"] as const;
type Valued = (typeof VALUED)[number];
const FLAGS = ["--digest", "--immediate", "--json"] as const;
type Flag = (typeof FLAGS)[number];

function parse(args: string[]): { values: Partial<Record<Valued, string>>; flags: Set<Flag> } {
  return parseOptions(args, VALUED, FLAGS);
}

/** The option a schema field comes from, for messages that name what the user typed. */
const OPTION_OF: Record<string, string> = { email: "--email", minLevel: "--min-level", digest: "--digest" };

function optionMessage(err: AppError): string {
  if (!err.errors?.length) return err.message;
  return err.errors.map((e) => (e.field ? `${OPTION_OF[e.field] ?? e.field}: ${e.message}` : e.message)).join("; ");
}

function formatRecipients(rows: MailRecipient[], slug: string): string {
  if (rows.length === 0) return `no mail recipients on ${slug}: epochal recipient add --site ${slug} --email ADDRESS`;
  const head = ["id", "address", "from level", "mails"];
  const cells = rows.map((r) => [String(r.id), r.email, r.minLevel, r.digest ? "digest" : "immediate"]);
  const w = head.map((h, i) => Math.max(h.length, ...cells.map((c) => c[i].length)));
  return [head, ...cells].map((c) => c.map((x, i) => x.padEnd(w[i])).join("  ").trimEnd()).join("\n");
}

export async function run(args: string[]): Promise<number> {
  const [subRaw, ...rest] = args;
  if (!(SUBS as readonly string[]).includes(subRaw)) {
    console.error(help);
    return 2;
  }
  const sub = subRaw as Sub;
  let values: Partial<Record<Valued, string>>;
  let flags: Set<Flag>;
  try {
    ({ values, flags } = parse(rest));
    if (!values["--site"]) throw new UsageError("--site SLUG is required");
    if (flags.has("--digest") && flags.has("--immediate")) throw new UsageError("give --digest or --immediate, not both");
    if ((sub === "update" || sub === "remove") && (values["--email"] === undefined) === (values["--id"] === undefined))
      throw new UsageError("name the recipient with --email ADDRESS or --id N (one of them)");
    if (values["--id"] !== undefined && !/^[1-9][0-9]*$/.test(values["--id"])) throw new UsageError(`--id: a recipient number from \`epochal recipient list\`, got ${JSON.stringify(values["--id"])}`);
    if (sub === "add" && values["--email"] === undefined) throw new UsageError("--email ADDRESS is required");
    if (sub === "update" && values["--min-level"] === undefined && !flags.has("--digest") && !flags.has("--immediate"))
      throw new UsageError("nothing to change: give --min-level L, --digest or --immediate");
    if (sub === "add" && flags.has("--immediate")) throw new UsageError("--immediate is for update (add mails at once unless --digest is given)");
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`epochal recipient ${sub}: ${err.message}`);
      return 2;
    }
    throw err;
  }
  const target = await openDatabaseUrl();
  try {
    await applyMigrations(target.url);
    const slug = values["--site"] as string;
    const site = await getDb().site.findUnique({ where: { slug }, select: { id: true, slug: true } });
    if (!site) {
      console.error(`epochal recipient ${sub}: --site: no site "${slug}"`);
      return 2;
    }
    const actor = { label: cliActor() };
    if (sub === "list") {
      const rows = await listRecipients(site.id);
      console.log(flags.has("--json") ? JSON.stringify({ recipients: rows.map((r) => ({ id: r.id, email: r.email, minLevel: r.minLevel, digest: r.digest })) }) : formatRecipients(rows, site.slug));
      return 0;
    }
    if (sub === "add") {
      const body = parseWith(RecipientCreateBody, { email: values["--email"], ...(values["--min-level"] === undefined ? {} : { minLevel: values["--min-level"] }), digest: flags.has("--digest") });
      const r = await addRecipient(site.id, body, actor);
      console.log(`recipient ${r.id} on ${site.slug}: ${r.email} from ${r.minLevel}, ${r.digest ? "digest" : "immediate"} mails`);
      return 0;
    }
    let id: number;
    if (values["--id"] !== undefined) id = Number(values["--id"]);
    else {
      const found = await findRecipientByEmail(site.id, values["--email"] as string);
      if (!found) {
        console.error(`epochal recipient ${sub}: --email: ${values["--email"]} is not a recipient on ${site.slug}`);
        return 2;
      }
      id = found.id;
    }
    if (sub === "remove") {
      const r = await removeRecipient(site.id, id, actor);
      console.log(`recipient ${r.id} (${r.email}) removed from ${site.slug}`);
      return 0;
    }
    const digest = flags.has("--digest") ? true : flags.has("--immediate") ? false : undefined;
    const patch = parseWith(RecipientPatchBody, { ...(values["--min-level"] === undefined ? {} : { minLevel: values["--min-level"] }), ...(digest === undefined ? {} : { digest }) });
    const r = await updateRecipient(site.id, id, patch, actor);
    console.log(`recipient ${r.id} on ${site.slug}: ${r.email} from ${r.minLevel}, ${r.digest ? "digest" : "immediate"} mails`);
    return 0;
  } catch (err) {
    if (isAppError(err)) {
      console.error(`epochal recipient ${sub}: ${optionMessage(err)}`);
      return 2;
    }
    throw err;
  } finally {
    await closeDb();
    await target.detach();
  }
}
