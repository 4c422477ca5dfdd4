// `epochal recipient …` in-process against the test database: the same service and audit rows as
// the API, messages that name the option, exit status 2 on bad input. (Each run closes the shared
// Prisma client, as the command does when it ends; getDb() opens a new one.)
import { afterEach, describe, expect, it, vi } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { run } from "../../../lib/server/cli/commands/recipient.ts";
import { uniqueSlug } from "../../support/unique.ts";

function capture() {
  const out: string[] = [];
  const err: string[] = [];
  vi.spyOn(console, "log").mockImplementation((...a: unknown[]) => void out.push(a.join(" ")));
  vi.spyOn(console, "error").mockImplementation((...a: unknown[]) => void err.push(a.join(" ")));
  return { out, err };
}

afterEach(() => vi.restoreAllMocks());

async function site(): Promise<{ id: number; slug: string }> {
  const slug = uniqueSlug("rcli");
  return getDb().site.create({ data: { slug, name: `CLI ${slug}`, timeZone: "Europe/Zurich" }, select: { id: true, slug: true } });
}

describe("epochal recipient", () => {
  it("add, list, update and remove a recipient, each change audited as cli:<os user>", async () => {
    const s = await site();
    const io = capture();
    expect(await run(["add", "--site", s.slug, "--email", "Night.Shift@Example.test", "--min-level", "alert"])).toBe(0);
    expect(io.out.pop()).toMatch(/^recipient \d+ on .+: night\.shift@example\.test from alert, immediate mails$/);
    expect(await run(["list", "--site", s.slug, "--json"])).toBe(0);
    const listed = JSON.parse(io.out.pop() as string) as { recipients: { id: number; email: string; minLevel: string; digest: boolean }[] };
    expect(listed.recipients).toEqual([{ id: expect.any(Number), email: "night.shift@example.test", minLevel: "alert", digest: false }]);
    const id = listed.recipients[0].id;
    expect(await run(["update", "--site", s.slug, "--email", "NIGHT.SHIFT@example.test", "--digest", "--min-level", "limit"])).toBe(0);
    expect(await run(["list", "--site", s.slug])).toBe(0);
    expect(io.out.pop()).toMatch(new RegExp(`^id\\s+address\\s+from level\\s+mails\\n${id}\\s+night\\.shift@example\\.test\\s+limit\\s+digest$`));
    expect(await run(["remove", "--site", s.slug, "--id", String(id)])).toBe(0);
    expect(io.out.pop()).toBe(`recipient ${id} (night.shift@example.test) removed from ${s.slug}`);
    expect(io.err).toEqual([]);
    expect(await getDb().mailRecipient.count({ where: { siteId: s.id } })).toBe(0);
    const audit = await getDb().auditEntry.findMany({ where: { siteId: s.id, entityType: "MailRecipient" }, orderBy: { id: "asc" } });
    expect(audit.map((a) => a.action)).toEqual(["recipient.create", "recipient.update", "recipient.delete"]);
    expect(audit.every((a) => /^cli:/.test(a.actor))).toBe(true);
  });

  it("exits 2 with a message naming the option for a bad address, level, missing site or recipient, and writes nothing", async () => {
    const s = await site();
    const io = capture();
    expect(await run(["add", "--site", s.slug, "--email", "nobody"])).toBe(2);
    expect(io.err.pop()).toMatch(/^epochal recipient add: --email: /);
    expect(await run(["add", "--site", s.slug, "--email", "a@example.test", "--min-level", "severe"])).toBe(2);
    expect(io.err.pop()).toMatch(/^epochal recipient add: --min-level: /);
    expect(await run(["add", "--email", "a@example.test"])).toBe(2);
    expect(io.err.pop()).toBe("epochal recipient add: --site SLUG is required");
    expect(await run(["list", "--site", `${s.slug}-missing`])).toBe(2);
    expect(io.err.pop()).toBe(`epochal recipient list: --site: no site "${s.slug}-missing"`);
    expect(await run(["remove", "--site", s.slug, "--email", "a@example.test"])).toBe(2);
    expect(io.err.pop()).toBe(`epochal recipient remove: --email: a@example.test is not a recipient on ${s.slug}`);
    expect(await run(["update", "--site", s.slug, "--id", "7"])).toBe(2);
    expect(io.err.pop()).toMatch(/nothing to change/);
    expect(await run(["add", "--site", s.slug, "--email", "a@example.test", "--colour", "red"])).toBe(2);
    expect(io.err.pop()).toMatch(/unknown option "--colour"/);
    expect(await getDb().mailRecipient.count({ where: { siteId: s.id } })).toBe(0);
    expect(await getDb().auditEntry.count({ where: { siteId: s.id } })).toBe(0);
  });
});
