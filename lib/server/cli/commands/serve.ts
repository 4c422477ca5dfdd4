import { serve, parsePort } from "../serve-core.ts";

export const help = `Usage: epochal serve [--port N] [--host H] [--rebuild]

Starts the dashboard and API. Uses DATABASE_URL when set, otherwise the embedded PostgreSQL in
.epochal-data/ (started now, or joined when another Epochal process already runs it). Applies
pending migrations, builds the app when the build is missing or older than the source, then
runs \`next start\`. PORT and HOST are read from the environment too (default 3000, 0.0.0.0).
With EPOCHAL_ADMIN_EMAIL and EPOCHAL_ADMIN_PASSWORD set and no user in the database yet, the
first administrator is created at start.`;

export async function run(args: string[]): Promise<number> {
  return serve(parsePort(args));
}
