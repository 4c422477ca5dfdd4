/**
 * `epochal site create|list`: sites in the database of DATABASE_URL, or the embedded default.
 */
import { userInfo } from "node:os";
import { openDatabaseUrl } from "../../db/connect.ts";
import { applyMigrations } from "../../db/migrate.ts";
import { getDb, closeDb } from "../../db/client.ts";
import { isAppError } from "../../errors.ts";
import { createSite, listSites, type SiteSummary } from "../../sites.ts";
import { parseOptions, UsageError } from "../options.ts";

export const help = `Usage:
  epochal site create --slug S --name N --time-zone Z [--sigma-h M --sigma-v M]
                      [--origin-lat D --origin-lon D --origin-height M] [--refuse-unknown-points]
  epochal site list [--json]

  --slug S            short name in URLs: lower-case letters, digits, inner hyphens
  --name N            display name
  --time-zone Z       IANA time zone in which times are shown, e.g. Europe/Zurich
  --sigma-h M         default σ of east and north, metres, where files give none (default 0.001)
  --sigma-v M         default σ of height, metres (default 0.0015)
  --origin-lat D      WGS84 origin of the local east-north-up frame for GeoJSON/GNSS input:
  --origin-lon D        latitude and longitude in degrees, ellipsoidal height in metres
  --origin-height M     (all three or none)
  --refuse-unknown-points   refuse epochs naming points not registered yet

Uses DATABASE_URL when set, otherwise the embedded database. Exit status 2 on bad input.`;

const VALUED = ["--slug", "--name", "--time-zone", "--sigma-h", "--sigma-v", "--origin-lat", "--origin-lon", "--origin-height"] as const;
type Valued = (typeof VALUED)[number];
const FLAGS = ["--refuse-unknown-points", "--json"] as const;
type FlagName = (typeof FLAGS)[number];

function parse(args: string[]): { values: Partial<Record<Valued, string>>; flags: Set<FlagName> } {
  return parseOptions(args, VALUED, FLAGS);
}

function number(flag: Valued, text: string | undefined): number | undefined {
  if (text === undefined) return undefined;
  const v = Number(text);
  if (text.trim() === "" || !Number.isFinite(v)) throw new UsageError(`option ${flag} must be a number, got ${JSON.stringify(text)}`);
  return v;
}

function formatSites(sites: SiteSummary[]): string {
  if (sites.length === 0) return "no sites yet: epochal site create --slug S --name N --time-zone Z";
  const head = ["slug", "name", "time zone", "σH m", "σV m", "origin", "points", "epochs", "last epoch (UTC)"];
  const rows = sites.map((s) => [
    s.slug,
    s.name,
    s.timeZone,
    String(s.sigmaHM),
    String(s.sigmaVM),
    s.origin ? `${s.origin.latDeg}, ${s.origin.lonDeg}, ${s.origin.heightM} m` : "-",
    String(s.points),
    String(s.epochs),
    s.lastEpochTime ?? "-",
  ]);
  const w = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  return [head, ...rows].map((r) => r.map((c, i) => c.padEnd(w[i])).join("  ").trimEnd()).join("\n");
}

export async function run(args: string[]): Promise<number> {
  const [sub, ...rest] = args;
  if (sub !== "create" && sub !== "list") {
    console.error(help);
    return 2;
  }
  let parsed;
  try {
    parsed = parse(rest);
    if (sub === "create") for (const f of ["--slug", "--name", "--time-zone"] as const) if (!parsed.values[f]) throw new UsageError(`option ${f} is required`);
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`epochal site: ${err.message}\n\n${help}`);
      return 2;
    }
    throw err;
  }
  const target = await openDatabaseUrl();
  try {
    await applyMigrations(target.url);
    const db = getDb();
    if (sub === "list") {
      const sites = await listSites(db);
      console.log(parsed.flags.has("--json") ? JSON.stringify({ sites }, null, 2) : formatSites(sites));
      return 0;
    }
    const v = parsed.values;
    const site = await createSite(
      {
        slug: v["--slug"] as string,
        name: v["--name"] as string,
        timeZone: v["--time-zone"] as string,
        sigmaHM: number("--sigma-h", v["--sigma-h"]),
        sigmaVM: number("--sigma-v", v["--sigma-v"]),
        originLatDeg: number("--origin-lat", v["--origin-lat"]),
        originLonDeg: number("--origin-lon", v["--origin-lon"]),
        originHeightM: number("--origin-height", v["--origin-height"]),
        refuseUnknownPoints: parsed.flags.has("--refuse-unknown-points") || undefined,
      },
      `cli:${userInfo().username}`,
      db,
    );
    console.log(parsed.flags.has("--json") ? JSON.stringify({ site }, null, 2) : `created site ${site.slug} (id ${site.id}); next: epochal token create --site ${site.slug} --scope ingest`);
    return 0;
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`epochal site: ${err.message}`);
      return 2;
    }
    if (isAppError(err) && (err.code === "invalid" || err.code === "conflict")) {
      const details = (err.errors ?? []).map((e) => `  ${flagOf(e.field)}: ${e.message}`).join("\n");
      console.error(`epochal site: ${err.message}${details ? `\n${details}` : ""}`);
      return 2;
    }
    throw err;
  } finally {
    await closeDb();
    await target.detach();
  }
}

const FIELD_FLAGS: Record<string, string> = {
  slug: "--slug",
  name: "--name",
  timeZone: "--time-zone",
  sigmaHM: "--sigma-h",
  sigmaVM: "--sigma-v",
  originLatDeg: "--origin-lat",
  originLonDeg: "--origin-lon",
  originHeightM: "--origin-height",
};
function flagOf(field: string | null): string {
  return field === null ? "site" : (FIELD_FLAGS[field] ?? field);
}
