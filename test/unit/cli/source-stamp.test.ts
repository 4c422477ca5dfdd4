/**
 * The build's source stamp (lib/server/cli/serve-core.ts) changes whenever a file under app/ or lib/
 * changes, also when the file was already changed since the last commit (the case that once kept a
 * stale build running), and stays the same when nothing changed.
 */
import { mkdtempSync, rmSync, utimesSync, writeFileSync, mkdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { spawnSync } from "node:child_process";
import { afterAll, describe, expect, it } from "vitest";
import { sourceStamp } from "../../../lib/server/cli/serve-core.ts";

const dir = mkdtempSync(join(tmpdir(), "epochal-stamp-"));
const git = (...args: string[]) => spawnSync("git", ["-c", "user.email=t@example.test", "-c", "user.name=t", ...args], { cwd: dir, encoding: "utf8" });
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("sourceStamp", () => {
  it("changes with every edit under app/ and lib/, and only then", () => {
    mkdirSync(join(dir, "app"));
    mkdirSync(join(dir, "lib"));
    writeFileSync(join(dir, "app", "page.tsx"), "export default 1\n");
    writeFileSync(join(dir, "README.md"), "readme\n");
    git("init", "-q");
    git("add", ".");
    git("commit", "-q", "-m", "one");
    const clean = sourceStamp(dir);
    expect(clean).toMatch(/^[0-9a-f]{40}$/);
    expect(sourceStamp(dir)).toBe(clean);
    writeFileSync(join(dir, "app", "page.tsx"), "export default 2\n");
    utimesSync(join(dir, "app", "page.tsx"), 1_000, 1_000);
    const edited = sourceStamp(dir);
    expect(edited).not.toBe(clean);
    writeFileSync(join(dir, "app", "page.tsx"), "export default 3\n");
    utimesSync(join(dir, "app", "page.tsx"), 2_000, 2_000);
    expect(sourceStamp(dir)).not.toBe(edited);
    const again = sourceStamp(dir);
    writeFileSync(join(dir, "lib", "new.ts"), "export {}\n");
    expect(sourceStamp(dir)).not.toBe(again);
    // Files outside app/ and lib/ do not count.
    const before = sourceStamp(dir);
    writeFileSync(join(dir, "README.md"), "changed\n");
    expect(sourceStamp(dir)).toBe(before);
  });
});
