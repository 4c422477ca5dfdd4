// Runs in each database test worker before the test file: point the app's client at the run's database.
import { inject, afterAll } from "vitest";
import { closeDb } from "../../lib/server/db/client.ts";

process.env.DATABASE_URL = inject("databaseUrl");
afterAll(async () => {
  await closeDb();
});
