/**
 * Global setup of the reliability tests: one production build (`next build`, reused while the
 * sources are unchanged) in EPOCHAL_DIST_DIR, default `.next` like the e2e tests, so `npm test`
 * builds once for both. Each test file starts its own `next start` servers on it (see server.ts),
 * because the tests kill and restart them.
 * EPOCHAL_REUSE_BUILD=1 skips the staleness check when a build exists (a developer's quick loop
 * while others edit the tree).
 */
import { existsSync } from "node:fs";
import { join } from "node:path";
import { ensureBuild } from "../../../lib/server/cli/serve-core.ts";

export default function setup(): void {
  const dist = process.env.EPOCHAL_DIST_DIR ?? ".next";
  if (process.env.EPOCHAL_REUSE_BUILD === "1" && existsSync(join(dist, "BUILD_ID"))) return;
  ensureBuild();
}
