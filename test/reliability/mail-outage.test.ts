/** Mail outage (long): SMTP down 30 s during an event, the server SIGKILLed and restarted meanwhile; every alert mail arrives once after SMTP returns. */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type pg from "pg";
import { createTestDatabase, type TestDatabase } from "../support/database.ts";
import { openPool, printFigures } from "./support/fixtures.ts";
import { runMailOutage } from "./support/mail-outage.ts";

let db: TestDatabase;
let pool: pg.Pool;
beforeAll(async () => {
  db = await createTestDatabase("rel_mail");
  pool = openPool(db.url);
});
afterAll(async () => {
  await pool?.end();
  await db?.drop();
});

describe("mail outage", () => {
  it("SMTP down 30 s during an event, the server SIGKILLed and restarted meanwhile: every alert mail is delivered after it returns, none twice", async () => {
    const { figures, problems } = await runMailOutage({ databaseUrl: db.url, pool, outageS: 30, killServer: true });
    printFigures("mail outage, 30 s", figures);
    expect(problems).toEqual([]);
    expect(figures.deliveredTwice).toBe(0);
    expect(figures.delivered).toBe(figures.alertMails);
  });
});
