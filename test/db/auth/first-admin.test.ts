/**
 * ensureFirstAdmin on a database of its own (the shared test database already has users):
 * creates the administrator from EPOCHAL_ADMIN_EMAIL / EPOCHAL_ADMIN_PASSWORD only while no user exists.
 */
import { afterAll, beforeAll, describe, expect, it, inject } from "vitest";
import pg from "pg";
import { applyMigrations } from "../../../lib/server/db/migrate.ts";
import { closeDb, getDb } from "../../../lib/server/db/client.ts";
import { ensureFirstAdmin } from "../../../lib/server/users.ts";
import { verifyPassword } from "../../../lib/server/auth/password.ts";

const base = new URL(inject("databaseUrl"));
const name = `epochal_firstadmin_${Date.now().toString(36)}_${process.pid}`;
const adminUrl = new URL(base);
adminUrl.pathname = "/postgres";
const ownUrl = new URL(base);
ownUrl.pathname = "/" + name;

beforeAll(async () => {
  const c = new pg.Client({ connectionString: adminUrl.toString() });
  await c.connect();
  await c.query(`create database "${name}"`);
  await c.end();
  await applyMigrations(ownUrl.toString());
  process.env.DATABASE_URL = ownUrl.toString();
});

afterAll(async () => {
  await closeDb();
  process.env.DATABASE_URL = inject("databaseUrl");
  const c = new pg.Client({ connectionString: adminUrl.toString() });
  await c.connect();
  await c.query(`drop database if exists "${name}" with (force)`);
  await c.end();
});

describe("ensureFirstAdmin", () => {
  it("does nothing without both variables", async () => {
    expect(await ensureFirstAdmin({ EPOCHAL_ADMIN_EMAIL: "root@example.test" })).toBeNull();
    expect(await getDb().user.count()).toBe(0);
  });

  it("creates a global administrator with a bcrypt hash when no user exists, audited as system:first-start", async () => {
    const note = await ensureFirstAdmin({ EPOCHAL_ADMIN_EMAIL: "Root@Example.test", EPOCHAL_ADMIN_PASSWORD: "first admin password" });
    expect(note).toMatch(/root@example.test/);
    const u = await getDb().user.findUniqueOrThrow({ where: { email: "root@example.test" } });
    expect(u.isAdmin).toBe(true);
    expect(u.passwordHash).toMatch(/^\$2[aby]\$12\$/);
    expect(await verifyPassword("first admin password", u.passwordHash)).toBe(true);
    const audit = await getDb().auditEntry.findFirstOrThrow({ where: { action: "user.create", entityId: String(u.id) } });
    expect(audit.actor).toBe("system:first-start");
  });

  it("does nothing once any user exists, whatever the variables say", async () => {
    expect(await ensureFirstAdmin({ EPOCHAL_ADMIN_EMAIL: "other@example.test", EPOCHAL_ADMIN_PASSWORD: "another admin password" })).toBeNull();
    expect(await getDb().user.count()).toBe(1);
  });
});
