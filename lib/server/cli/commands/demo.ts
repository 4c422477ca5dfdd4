/**
 * `epochal demo` (what `npm run demo` runs): seed the invented demo site through the ingest service,
 * then start the dashboard like `epochal serve`. A second run finds the site complete and starts at once.
 */
import { serve, parsePort } from "../serve-core.ts";
import { seedDemo } from "../../../../seed/demo.ts";
import { demoCredentialLines } from "../../../../seed/demo-users.ts";

export const help = `Usage: epochal demo [--port N] [--host H] [--rebuild]

Loads the demo site "Copperwick Lane station box" (invented: a deep excavation beside a terrace of old
houses and a retaining wall, six months of epochs at a 6-hour cycle) into the database, through the
same ingest service as the API, then starts the dashboard (see \`epochal serve --help\` for the
database and the options). Loading takes under a minute the first time and is skipped when the site
is complete. Demo accounts for every role are printed when the server is ready; alert mails of the
demo site go to the outbox, never to a mail server.`;

export async function run(args: string[]): Promise<number> {
  return serve({
    ...parsePort(args),
    afterMigrate: async (url) => {
      const r = await seedDemo({ databaseUrl: url });
      return [
        `Demo site: /sites/${r.siteSlug} (${r.siteName}: ${r.epochsStored} epochs, ${r.alertsOpen} open alerts)`,
        ...demoCredentialLines(),
      ];
    },
  });
}
