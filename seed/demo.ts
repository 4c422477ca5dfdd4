/**
 * Seeds the demo site (seed/scenario.ts) into a database through the real services: the site, its
 * points' metadata, demo users for every role, mail recipients, hand-made and triangulated elements,
 * trigger rules from the literature preset scaled by the (invented) site engineer, then six months of
 * epochs through `ingestEpochs` in chunks, with the alert evaluation after each chunk, as the server's
 * pipeline would do, so that alerts, their history and the outbox fill up on the way.
 *
 * Idempotent: the site, points, users, memberships, recipients, elements and rules are found by their
 * natural keys before anything is created; epochs are idempotent by content hash in ingest. A site that
 * already holds every epoch is left as it is after a few quick checks. Alerts are evaluated only for
 * epochs that ingest reports as created, so a second run never evaluates an epoch twice.
 *
 * Mails go to the outbox (status "outbox"), never to an SMTP server: the demo recipients are invented.
 */
import { getDb, closeDb, type Db } from "../lib/server/db/client.ts";
import { createSite } from "../lib/server/sites.ts";
import { ingestEpochs } from "../lib/server/ingest/service.ts";
import { createElement, generateElements } from "../lib/server/elements.ts";
import { createRule } from "../lib/server/rules.ts";
import { evaluateAlerts } from "../lib/server/alerts/evaluate.ts";
import { createUser, findUserByEmail, grantRole } from "../lib/server/users.ts";
import type { Actor, SiteRow } from "../lib/server/http/route.ts";
import type { EpochInput, ObservationKey } from "../lib/formats/epoch-json.ts";
import { findPreset } from "../lib/triggers/presets.ts";
import { DAMAGE_CATEGORIES } from "../lib/triggers/damage-categories.ts";
import { generateScenario, DEFAULT_SEED, type Scenario, type ScenarioEpoch } from "./scenario.ts";
import { DEMO_RECIPIENTS, DEMO_USERS } from "./demo-users.ts";

export interface SeedDemoOptions {
  databaseUrl: string;
  /** No progress bar or messages. */
  quiet?: boolean;
  /** Epochs of the scenario (default: all 730). */
  epochs?: number;
  seed?: number;
}

export interface SeedDemoResult {
  siteSlug: string;
  siteName: string;
  users: { email: string; password: string; role: string }[];
  epochsStored: number;
  /** Epochs this run created (0 when the site already held them all). */
  epochsCreated: number;
  alertsOpen: number;
  alertsCleared: number;
  elapsedMs: number;
}

const ACTOR_LABEL = "cli:demo";
/** The seeding acts as a system actor with the site's engineer's rights; labels go in the audit log. */
const ACTOR: Actor = { kind: "user", userId: 0, email: "demo-seed@demo.epochal.test", name: "Demo seed", isAdmin: true, label: ACTOR_LABEL };
/** Epochs per ingest request: the size a logger's backfill would post. */
const CHUNK = 40;

/** Triangulation of the ground targets (domain.md §2): default sliver angle, no triangles across the pit. */
export const DEMO_TRIANGULATION = { minAngleDeg: 20, maxEdgeM: 26, pointGroup: "ground", namePrefix: "" } as const;

/**
 * The site engineer's levels for the two gables (invented, for old masonry with lime mortar): the
 * literature categories shifted one step stricter, review at half the onset of category 1:
 *   review = ½ × onset of category 1 (0.025 %), alert = onset of category 1 (0.05 %),
 *   limit = onset of category 2 (0.075 %) — Boscardin & Cording (1989), after Burland et al. (1977).
 * Hysteresis 200 µε, about twice the σ of a 16 m baseline at σ = 1 mm, so that survey noise cannot
 * make the level flap from one epoch to the next.
 */
export function demoGableLevels(): { review: number; alert: number; limit: number; hysteresis: number } {
  const onset = (c: string) => {
    const d = DAMAGE_CATEGORIES.find((x) => x.category === c);
    if (!d) throw new Error(`damage category ${c} missing`);
    return d.minStrain;
  };
  return { review: 0.5 * onset("1"), alert: onset("1"), limit: onset("2"), hysteresis: 0.0002 };
}

function toEpochInput(ep: ScenarioEpoch, index: number): EpochInput {
  return {
    time: ep.time,
    timeAt: { line: null, field: `epochs[${index}].time` },
    observations: ep.observations.map((o) => ({
      point: o.point,
      east: o.east,
      north: o.north,
      height: o.height,
      sigmaEast: o.sigmaEast ?? null,
      sigmaNorth: o.sigmaNorth ?? null,
      sigmaHeight: o.sigmaHeight ?? null,
      line: null,
    })),
    fieldOf: (i: number, key: ObservationKey) => `epochs[${index}].observations[${i}].${key}`,
  };
}

/** A text progress bar on stderr: `[#####-----] 45% epochs 330/730`; redrawn in place on a terminal. */
export function progressBar(done: number, total: number, width = 20): string {
  const f = total > 0 ? Math.min(1, done / total) : 1;
  const n = Math.round(f * width);
  return `[${"#".repeat(n)}${"-".repeat(width - n)}] ${String(Math.round(f * 100)).padStart(3)}% epochs ${done}/${total}`;
}

function makeProgress(quiet: boolean): { update: (done: number, total: number) => void; done: () => void; log: (m: string) => void } {
  if (quiet) return { update: () => undefined, done: () => undefined, log: () => undefined };
  const tty = process.stderr.isTTY === true;
  let lastTenth = -1;
  return {
    update(done, total) {
      if (tty) process.stderr.write(`\r${progressBar(done, total)}`);
      else {
        const tenth = Math.floor((10 * done) / Math.max(1, total));
        if (tenth !== lastTenth) {
          lastTenth = tenth;
          process.stderr.write(`${progressBar(done, total)}\n`);
        }
      }
    },
    done() {
      if (tty) process.stderr.write("\n");
    },
    log(m) {
      process.stderr.write(`${m}\n`);
    },
  };
}

async function ensureSite(db: Db, sc: Scenario): Promise<SiteRow> {
  const s = sc.site;
  let row = await db.site.findUnique({ where: { slug: s.slug }, select: { id: true, slug: true, name: true, timeZone: true, frameDescription: true } });
  if (!row) {
    await createSite(
      { slug: s.slug, name: s.name, timeZone: s.timeZone, sigmaHM: s.sigmaHM, sigmaVM: s.sigmaVM, originLatDeg: s.originLatDeg, originLonDeg: s.originLonDeg, originHeightM: s.originHeightM },
      ACTOR_LABEL,
      db,
    );
    row = await db.site.findUniqueOrThrow({ where: { slug: s.slug }, select: { id: true, slug: true, name: true, timeZone: true, frameDescription: true } });
  }
  if (row.frameDescription !== s.frameDescription) await db.site.update({ where: { id: row.id }, data: { frameDescription: s.frameDescription } });
  return { id: row.id, slug: row.slug, name: row.name, timeZone: row.timeZone };
}

/** Registers the points with their group, reference flag and note (ingest would register bare codes). */
async function ensurePoints(db: Db, siteId: number, sc: Scenario): Promise<void> {
  await db.point.createMany({
    data: sc.points.map((p) => ({ siteId, code: p.code, kind: p.kind, group: p.group, isReference: p.isReference, note: p.note })),
    skipDuplicates: true,
  });
}

async function ensureUsers(siteId: number): Promise<void> {
  for (const u of DEMO_USERS) {
    let user = await findUserByEmail(u.email);
    if (!user) user = await createUser({ email: u.email, name: u.name, password: u.password, isAdmin: u.role === "admin" }, ACTOR_LABEL);
    await grantRole(user.id, siteId, u.role, ACTOR_LABEL);
  }
}

async function ensureRecipients(db: Db, siteId: number): Promise<void> {
  for (const r of DEMO_RECIPIENTS) {
    await db.mailRecipient.upsert({ where: { siteId_email: { siteId, email: r.email } }, create: { siteId, email: r.email, minLevel: r.minLevel, digest: r.digest }, update: {} });
  }
}

/** The hand-made gable and wall elements: need the points only (their history is computed as epochs arrive). */
async function ensureManualElements(db: Db, site: SiteRow, sc: Scenario): Promise<void> {
  const existing = new Set((await db.element.findMany({ where: { siteId: site.id }, select: { name: true } })).map((e) => e.name));
  const todo = sc.elements.filter((el) => !existing.has(el.name));
  // A few at a time: each is its own transaction with its audit row.
  for (let k = 0; k < todo.length; k += 6) {
    await Promise.all(
      todo.slice(k, k + 6).map((el) => createElement(db, site, ACTOR, { name: el.name, label: el.label, kind: el.kind, mode: el.mode, points: el.pointCodes })),
    );
  }
}

/** Plan triangles of the ground targets at the reference epoch (once), then every element id by name. */
async function ensureTriangulation(db: Db, site: SiteRow): Promise<Map<string, number>> {
  // generateElements skips triangles whose name exists, so a second call creates nothing.
  const hasTriangulation = await db.element.count({ where: { siteId: site.id, source: "triangulation" } });
  if (hasTriangulation === 0) await generateElements(db, site, ACTOR, { ...DEMO_TRIANGULATION });
  return new Map((await db.element.findMany({ where: { siteId: site.id }, select: { id: true, name: true } })).map((e) => [e.name, e.id]));
}

async function ensureRules(db: Db, siteId: number, sc: Scenario, elementIds: Map<string, number>): Promise<void> {
  const preset = findPreset("building-baseline-strain");
  if (!preset) throw new Error("seedDemo: the literature preset building-baseline-strain is missing (lib/triggers/presets.ts)");
  const lv = demoGableLevels();
  const have = new Set((await db.triggerRule.findMany({ where: { siteId }, select: { name: true } })).map((r) => r.name));
  const houses: { structure: "house-12" | "house-26"; name: string }[] = [
    { structure: "house-12", name: "No. 12 Ashwend Row gable: horizontal tensile strain" },
    { structure: "house-26", name: "No. 26 Ashwend Row gable: horizontal tensile strain" },
  ];
  for (const h of houses) {
    if (have.has(h.name)) continue;
    const ids = sc.elements.filter((e) => e.structure === h.structure && e.kind === "baseline").map((e) => elementIds.get(e.name));
    if (ids.some((id) => id === undefined)) throw new Error(`seedDemo: an element of ${h.structure} was not created`);
    await createRule(
      siteId,
      {
        name: h.name,
        preset: preset.id,
        elementIds: ids as number[],
        reviewLevel: lv.review,
        alertLevel: lv.alert,
        limitLevel: lv.limit,
        hysteresis: lv.hysteresis,
        significantOnly: true,
        responseReview: "Check this epoch's readings; walk round the gable and photograph the crack gauges; tell the party-wall surveyor.",
        responseAlert: "Inform the site engineer today; crack survey of the gable; daily readings; review the excavation sequence at this end.",
        responseLimit: "Stop excavation at this end; install the contingency props; inform the owners and the party-wall surveyor.",
      },
      { label: ACTOR_LABEL },
      db,
    );
  }
}

/**
 * Seeds (or completes) the demo site on the database at `databaseUrl`, which must be migrated.
 * Works on an empty database; a second call adds nothing.
 */
export async function seedDemo(opts: SeedDemoOptions): Promise<SeedDemoResult> {
  const t0 = Date.now();
  const progress = makeProgress(opts.quiet ?? false);
  const previousUrl = process.env.DATABASE_URL;
  const ownClient = previousUrl !== opts.databaseUrl;
  // The user and auth services use the shared client of DATABASE_URL: point it at this database.
  process.env.DATABASE_URL = opts.databaseUrl;
  try {
    const db = getDb();
    const sc = generateScenario({ seed: opts.seed ?? DEFAULT_SEED, ...(opts.epochs ? { epochs: opts.epochs } : {}) });
    const site = await ensureSite(db, sc);
    await ensurePoints(db, site.id, sc);
    await ensureRecipients(db, site.id);
    await ensureManualElements(db, site, sc);

    const times = sc.epochs.map((e) => new Date(e.time));
    const stored = await db.epoch.findMany({ where: { siteId: site.id, isCurrent: true, time: { in: times } }, select: { time: true } });
    const have = new Set(stored.map((e) => e.time.getTime()));
    const todo = sc.epochs.map((e, i) => ({ e, i })).filter(({ e }) => !have.has(Date.parse(e.time)));
    const lastMs = Date.parse(sc.epochs[sc.epochs.length - 1].time);
    // The scenario has fixed dates: never let a slow clock refuse them as "in the future".
    const nowMs = Math.max(Date.now(), lastMs + 60_000);
    const publicUrl = (process.env.EPOCHAL_PUBLIC_URL ?? "http://localhost:3000").replace(/\/+$/, "");
    let created = 0;
    let users: Promise<void> | null = null;
    // Alert evaluation of one chunk overlaps the ingest of the next; evaluations stay in epoch order.
    let evaluation: Promise<unknown> = Promise.resolve();

    const ingestChunk = async (chunk: { e: ScenarioEpoch; i: number }[]) => {
      const r = await ingestEpochs(
        chunk.map(({ e, i }) => toEpochInput(e, i)),
        { siteId: site.id, actor: ACTOR_LABEL, source: "demo", nowMs },
        db,
      );
      const ids = r.epochs.filter((x) => x.outcome !== "unchanged").map((x) => x.id);
      created += ids.length;
      if (ids.length) {
        const previous = evaluation;
        evaluation = previous.then(() => evaluateAlerts(db, site.id, ids, { hasSmtp: false, publicUrl }));
        // Surface a failure at the next await instead of as an unhandled rejection.
        evaluation.catch(() => undefined);
      }
    };

    if (todo.length > 0) {
      progress.log(`Seeding the demo site "${sc.site.name}" (${sc.points.length} targets, ${sc.epochs.length} epochs) …`);
      progress.update(have.size, sc.epochs.length);
      let k = 0;
      // The reference epoch first: the triangulation is made on it, and the rules exist before the rest.
      if (!have.has(Date.parse(sc.epochs[0].time))) {
        await ingestChunk(todo.slice(0, 1));
        k = 1;
      }
      await ensureRules(db, site.id, sc, await ensureTriangulation(db, site));
      // bcrypt hashing of the demo passwords runs while the epochs go in.
      users = ensureUsers(site.id);
      users.catch(() => undefined);
      for (; k < todo.length; k += CHUNK) {
        await ingestChunk(todo.slice(k, k + CHUNK));
        progress.update(have.size + Math.min(todo.length, k + CHUNK), sc.epochs.length);
      }
      await evaluation;
      progress.done();
    } else {
      await ensureRules(db, site.id, sc, await ensureTriangulation(db, site));
    }
    await (users ?? ensureUsers(site.id));

    const epochsStored = await db.epoch.count({ where: { siteId: site.id, isCurrent: true } });
    const alertsOpen = await db.alert.count({ where: { siteId: site.id, clearedAt: null, isSignificant: true } });
    const alertsCleared = await db.alert.count({ where: { siteId: site.id, clearedAt: { not: null } } });
    const elapsedMs = Date.now() - t0;
    if (todo.length > 0) progress.log(`Demo site ready: ${epochsStored} epochs, ${alertsOpen} open alerts, ${alertsCleared} cleared (${(elapsedMs / 1000).toFixed(1)} s).`);
    return {
      siteSlug: site.slug,
      siteName: site.name,
      users: DEMO_USERS.map((u) => ({ email: u.email, password: u.password, role: u.role })),
      epochsStored,
      epochsCreated: created,
      alertsOpen,
      alertsCleared,
      elapsedMs,
    };
  } finally {
    if (ownClient) {
      await closeDb();
      if (previousUrl === undefined) delete process.env.DATABASE_URL;
      else process.env.DATABASE_URL = previousUrl;
    }
  }
}
