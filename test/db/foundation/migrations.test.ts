import { describe, expect, it } from "vitest";
import { inject } from "vitest";
import pg from "pg";
import { applyMigrations } from "../../../lib/server/db/migrate.ts";
import { checkHealth } from "../../../lib/server/health.ts";
import { readdirSync } from "node:fs";

const onDisk = readdirSync("prisma/migrations", { withFileTypes: true }).filter((d) => d.isDirectory()).length;

describe("migrations", () => {
  it("applyMigrations on the already-migrated test database applies nothing", async () => {
    const r = await applyMigrations(inject("databaseUrl"));
    expect(r.applied).toEqual([]);
    expect(r.total).toBe(onDisk);
  });

  it("applyMigrations on an empty database applies every migration once, then nothing", async () => {
    const base = new URL(inject("databaseUrl"));
    const name = `epochal_empty_${Date.now().toString(36)}`;
    const adminUrl = new URL(base);
    adminUrl.pathname = "/postgres";
    const admin = new pg.Client({ connectionString: adminUrl.toString() });
    await admin.connect();
    await admin.query(`create database "${name}"`);
    try {
      const url = new URL(base);
      url.pathname = "/" + name;
      const first = await applyMigrations(url.toString());
      expect(first.applied.length).toBe(onDisk);
      const second = await applyMigrations(url.toString());
      expect(second.applied).toEqual([]);
      const c = new pg.Client({ connectionString: url.toString() });
      await c.connect();
      const rows = await c.query(`select migration_name from "_prisma_migrations" where finished_at is not null`);
      await c.end();
      expect(rows.rowCount).toBe(onDisk);
    } finally {
      await admin.query(`drop database if exists "${name}" with (force)`);
      await admin.end();
    }
  });
});

describe("constraints", () => {
  it("the database refuses NaN coordinates, duplicate point codes, and edits of the audit log", async () => {
    const c = new pg.Client({ connectionString: inject("databaseUrl") });
    await c.connect();
    try {
      const slug = `cons-${Date.now().toString(36)}`;
      const site = await c.query(`insert into "Site"(slug, name, "timeZone") values ($1, 'Constraint check', 'UTC') returning id`, [slug]);
      const siteId = site.rows[0].id as number;
      const p = await c.query(`insert into "Point"("siteId", code) values ($1, 'P1') returning id`, [siteId]);
      await expect(c.query(`insert into "Point"("siteId", code) values ($1, 'P1')`, [siteId])).rejects.toThrow(/unique/i);
      const e = await c.query(`insert into "Epoch"("siteId", time, "contentHash") values ($1, now(), 'x') returning id`, [siteId]);
      await expect(
        c.query(`insert into "Observation"("epochId","pointId",east,north,height,"sigmaEast","sigmaNorth","sigmaHeight") values ($1,$2,'NaN',0,0,0.001,0.001,0.001)`, [e.rows[0].id, p.rows[0].id]),
      ).rejects.toThrow(/Observation_finite_check/);
      await expect(
        c.query(`insert into "Observation"("epochId","pointId",east,north,height,"sigmaEast","sigmaNorth","sigmaHeight") values ($1,$2,0,0,0,0,0.001,0.001)`, [e.rows[0].id, p.rows[0].id]),
      ).rejects.toThrow(/Observation_finite_check/);
      await c.query(`insert into "AuditEntry"(actor, action, "entityType", "siteId") values ('test', 'check', 'site', $1)`, [siteId]);
      await expect(c.query(`update "AuditEntry" set actor = 'someone else' where "siteId" = $1`, [siteId])).rejects.toThrow(/append-only/);
      await expect(c.query(`delete from "AuditEntry" where "siteId" = $1`, [siteId])).rejects.toThrow(/append-only/);
    } finally {
      await c.end();
    }
  });
});

describe("checkHealth", () => {
  it("reports the database up with the applied migration count", async () => {
    const h = await checkHealth();
    expect(h.database.state).toBe("up");
    expect(h.database.appliedMigrations).toBe(onDisk);
  });
});
