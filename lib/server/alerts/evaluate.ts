/**
 * Alert evaluation after epochs are committed: for every enabled rule of the site and every element
 * of the rule, the element's results at the new epochs are run through the state machine
 * (lib/triggers/evaluate.ts) in epoch time order, and the transitions are written: one Alert per rule
 * and element while the condition lasts, one AlertEvent per change, mail rows for openings and
 * escalations. All of it in one transaction under a per-site advisory lock, so two ingests of the same
 * site cannot both open an alert; mails are queued only after commit (runAlerting). The transaction
 * is a plain pg one with parameterised SQL (lib/server/ingest/pg-tx.ts), as ingest's is: through
 * Prisma's interactive transaction the same work cost about 40 ms per live epoch of ~4,000 elements
 * (test/bench/ingest.ts), nearly all of it per-call overhead.
 *
 * Which results: the element's reference epoch as the results engine uses it (Element.referenceEpochId,
 * else the site's reference); only current epoch revisions. An epoch not later than an open alert's last
 * evaluated epoch is skipped for that alert (late data does not rewrite an alert's past). A rate uses the
 * element's last result before the first new epoch, then the new epochs in order.
 *
 * Recorded, not mailed: a watch (crossing seen, not significant: event "not-significant"), a held rise
 * ("not-significant"), de-escalation and clearing. After an alert is acknowledged, its escalations are
 * still recorded but no longer mailed (neither immediately nor in digests).
 */
import { getDb, type Db } from "../db/client.ts";
import type { Alert } from "../db/generated/client.ts";
import { evaluateTransition, nextState, type AlertState, type Transition } from "../../triggers/evaluate.ts";
import { comparedValueOf, DEFAULT_SIGNIFICANCE_K, type ComparedValue, type QuantitySample } from "../../triggers/quantities.ts";
import { higherLevel, isRuleQuantity, isTriggerLevel, parseQuantity, type RuleSpec, type TriggerLevel } from "../../triggers/rule.ts";
import { recordAlertMails } from "../mail/outgoing.ts";
import type { AlertMailFacts } from "../mail/compose.ts";
import { mailConfigFromEnv, type MailConfig } from "../mail/config.ts";
import { enqueueMails, scheduleDigest, startMailWorker } from "../mail/queue.ts";
import { pgQuery, withPgTransaction, type Sql } from "../ingest/pg-tx.ts";
import type { PhaseTimer } from "../timing.ts";
import { intArray } from "../ingest/sql-arrays.ts";
import { readInputs, sampleOf, type ElementHead } from "./inputs.ts";
import { insertAlert, insertEvent, updateAlert, writeStays, type AlertChange } from "./alert-rows.ts";

/** Advisory lock class of alert evaluation (the second key is the site id). */
export const ALERT_LOCK_CLASS = 727_001;

export type EvaluateOptions = {
  hasSmtp: boolean;
  publicUrl: string;
  k?: number;
  /** Phase laps (the ingest route's Server-Timing). */
  timer?: PhaseTimer;
  /**
   * Evaluate only those of the epochs still in the alert backlog (backlog.ts), as the pipeline and the
   * sweep do; without it every given epoch is evaluated. Either way their backlog rows are removed.
   */
  onlyQueued?: boolean;
};

export type TransitionRecord = { ruleId: number; elementId: number; epochId: number; alertId: number | null; transition: Transition };

/** `evaluatedEpochs`: the epochs run through the rules (0 when the site has no enabled rule). */
export type EvaluationReport = { transitions: TransitionRecord[]; queuedMailIds: number[]; digestItems: number; evaluatedEpochs: number };

function stateOf(a: Pick<Alert, "clearedAt" | "level" | "isSignificant"> | null): AlertState {
  if (!a || a.clearedAt || !isTriggerLevel(a.level)) return { status: "none" };
  return { status: a.isSignificant ? "open" : "watch", level: a.level };
}

function responseFor(rule: { responseReview: string; responseAlert: string; responseLimit: string }, level: TriggerLevel): string {
  return level === "review" ? rule.responseReview : level === "alert" ? rule.responseAlert : rule.responseLimit;
}

export async function evaluateAlerts(_db: Db, siteId: number, epochIds: readonly number[], opts: EvaluateOptions): Promise<EvaluationReport> {
  const k = opts.k ?? DEFAULT_SIGNIFICANCE_K;
  const empty = (): EvaluationReport => ({ transitions: [], queuedMailIds: [], digestItems: 0, evaluatedEpochs: 0 });
  if (epochIds.length === 0) return empty();
  const ids = intArray([...epochIds]);
  // Most epochs of most sites meet no enabled rule: that is answered without opening a transaction.
  const inputs = await readInputs(siteId, epochIds, opts.timer);
  if (!inputs) {
    await pgQuery(`DELETE FROM "AlertBacklog" WHERE "epochId" = ANY($1::int[])`, [ids]);
    return empty();
  }
  const { rules, elements, rowAt, prevRow } = inputs;
  // What a mail names (the site, the recipients, the element), read once each and only when a mail is written.
  let mailSite: { site: AlertMailFacts["site"]; recipients: { email: string; minLevel: string; digest: boolean }[] } | null = null;
  const siteForMail = async (sql: Sql) => {
    if (!mailSite) {
      const [site] = await sql.query<AlertMailFacts["site"]>(`SELECT id, slug, name, "timeZone" FROM "Site" WHERE id = $1`, [siteId]);
      const recipients = await sql.query<{ email: string; minLevel: string; digest: boolean }>(`SELECT email, "minLevel", digest FROM "MailRecipient" WHERE "siteId" = $1 ORDER BY id`, [siteId]);
      mailSite = { site, recipients };
    }
    return mailSite;
  };
  const heads = new Map<number, ElementHead>();
  const headOf = async (sql: Sql, elementId: number): Promise<ElementHead> => {
    let h = heads.get(elementId);
    if (!h) {
      [h] = await sql.query<ElementHead>(`SELECT id, name, label, kind, "referenceEpochId" FROM "Element" WHERE id = $1`, [elementId]);
      heads.set(elementId, h);
    }
    return h;
  };
  const report = await withPgTransaction(
    async (tx) => {
      await tx.query(`SELECT pg_advisory_xact_lock($1::int, $2::int)`, [ALERT_LOCK_CLASS, siteId]);
      const report = empty();
      // Taken out of the backlog in the transaction that writes their alerts: evaluated once.
      const claimed = await tx.query<{ epochId: number }>(`DELETE FROM "AlertBacklog" WHERE "epochId" = ANY($1::int[]) RETURNING "epochId"`, [ids]);
      const queued = new Set(claimed.map((c) => c.epochId));
      const epochs = opts.onlyQueued ? inputs.epochs.filter((e) => queued.has(e.id)) : inputs.epochs;
      report.evaluatedEpochs = epochs.length;
      if (epochs.length === 0) return report;
      const openAlerts = await tx.query<Alert & { lastTime: Date | null }>(
        `SELECT a.*, e."time" AS "lastTime" FROM "Alert" a LEFT JOIN "Epoch" e ON e.id = a."lastEpochId"
          WHERE a."siteId" = $1 AND a."clearedAt" IS NULL AND a."ruleId" = ANY($2::int[]) ORDER BY a.id`,
        [siteId, intArray(rules.map((r) => r.id))],
      );
      /** Open alerts by rule id, then element id. */
      const openBy = new Map<number, Map<number, Alert>>();
      const lastEpochTime = new Map<number, number>();
      for (const a of openAlerts) {
        let m = openBy.get(a.ruleId);
        if (!m) openBy.set(a.ruleId, (m = new Map()));
        m.set(a.elementId, a);
        if (a.lastTime) lastEpochTime.set(a.lastEpochId, a.lastTime.getTime());
      }
      // Alerts whose only change is the latest value ("stay"): one UPDATE for all of them at the end.
      const stays: { id: number; lastEpochId: number; value: number; sigma: number | null }[] = [];
      const rowsOfEpoch = epochs.map((ep) => rowAt.get(ep.id));
      for (const rule of rules) {
        if (!isRuleQuantity(rule.quantity)) continue;
        const spec: RuleSpec = {
          quantity: rule.quantity,
          levels: { review: rule.reviewLevel, alert: rule.alertLevel, limit: rule.limitLevel },
          hysteresis: rule.hysteresis,
          significantOnly: rule.significantOnly,
        };
        const { base } = parseQuantity(rule.quantity);
        const openOfRule = openBy.get(rule.id);
        for (const elementId of new Set(rule.elementIds)) {
          if (!elements.has(elementId)) continue;
          let alert: Alert | null = openOfRule?.get(elementId) ?? null;
          const watermark = alert ? (lastEpochTime.get(alert.lastEpochId) ?? -Infinity) : -Infinity;
          let state = stateOf(alert);
          const p = prevRow.get(elementId);
          let prev: QuantitySample | null = p ? sampleOf(p, base) : null;
          let dirty: { lastEpochId: number; value: number; sigma: number | null } | null = null;

          for (let e = 0; e < epochs.length; e++) {
            const ep = epochs[e];
            if (ep.time.getTime() <= watermark) continue;
            const row = rowsOfEpoch[e]?.get(elementId);
            if (!row) continue;
            const sample = sampleOf(row, base);
            const v = comparedValueOf(rule.quantity, sample, prev, k);
            if (sample.value !== null) prev = sample;
            const t = evaluateTransition(spec, state, v);
            if (t.kind === "none" || t.kind === "no-value") {
              state = nextState(state, t);
              continue;
            }
            const cv = v as ComparedValue;
            const latest = { lastEpochId: ep.id, value: cv.raw, sigma: cv.sigma };
            const event = async (kind: string, level: TriggerLevel, comment: string | null = null) => ({
              id: await insertEvent(tx, { alertId: alert!.id, at: ep.time, kind, level, value: cv.raw, comment }),
            });
            const notSignificantNote = `not significant at k = ${k.toFixed(2)}: |value| ≤ k·σ; not counted (rule counts significant values only)`;
            let mailFor: { kind: "open" | "escalate"; from: TriggerLevel | null; level: TriggerLevel; eventId: bigint } | null = null;

            if (t.kind === "stay") {
              dirty = latest;
            } else if (state.status === "none") {
              // open or watch from nothing: a new alert.
              const level = t.kind === "open" || t.kind === "watch" ? t.level : null;
              if (!level) throw new Error(`unexpected transition ${t.kind} from none`);
              alert = await insertAlert(tx, { siteId, ruleId: rule.id, elementId, level, peakLevel: level, openedAt: ep.time, openedEpochId: ep.id, ...latest, isSignificant: t.kind === "open" });
              const e = await event(t.kind === "open" ? "open" : "not-significant", level, t.kind === "open" ? null : notSignificantNote);
              if (t.kind === "open") mailFor = { kind: "open", from: null, level, eventId: e.id };
              dirty = null;
            } else {
              const a: Alert = alert!;
              let data: AlertChange = { ...latest };
              if (t.kind === "open") {
                data = { ...data, level: t.level, peakLevel: higherLevel(a.peakLevel as TriggerLevel, t.level)!, isSignificant: true, openedAt: ep.time, openedEpochId: ep.id };
                const e = await event("open", t.level);
                mailFor = { kind: "open", from: null, level: t.level, eventId: e.id };
              } else if (t.kind === "watch") {
                data = { ...data, level: t.level, peakLevel: higherLevel(a.peakLevel as TriggerLevel, t.level)! };
                await event("not-significant", t.level, notSignificantNote);
              } else if (t.kind === "escalate") {
                data = { ...data, level: t.level, peakLevel: higherLevel(a.peakLevel as TriggerLevel, t.level)! };
                const e = await event("escalate", t.level, `from ${t.from}`);
                mailFor = { kind: "escalate", from: t.from, level: t.level, eventId: e.id };
              } else if (t.kind === "held") {
                await event("not-significant", t.wouldBe, `${notSignificantNote}; level stays ${t.level}`);
              } else if (t.kind === "de-escalate") {
                data = { ...data, level: t.level };
                await event("de-escalate", t.level, `from ${t.from}`);
              } else if (t.kind === "clear") {
                data = { ...data, clearedAt: ep.time };
                await event("clear", t.from, "fell below review − hysteresis");
              }
              alert = await updateAlert(tx, a.id, data);
              dirty = null;
            }

            report.transitions.push({ ruleId: rule.id, elementId, epochId: ep.id, alertId: alert?.id ?? null, transition: t });
            if (mailFor && alert && !alert.acknowledgedAt) {
              const element = await headOf(tx, elementId);
              const { site, recipients } = await siteForMail(tx);
              const facts: AlertMailFacts = {
                site,
                element: { id: element.id, name: element.name, label: element.label, kind: element.kind },
                rule: { name: rule.name, quantity: rule.quantity, levels: spec.levels, hysteresis: spec.hysteresis, response: responseFor(rule, mailFor.level) },
                eventKind: mailFor.kind,
                fromLevel: mailFor.from,
                level: mailFor.level,
                value: cv.raw,
                sigma: cv.sigma,
                isSignificant: cv.isSignificant,
                time: ep.time,
                publicUrl: opts.publicUrl,
              };
              const m = await recordAlertMails(tx, { siteId, alertId: alert.id, eventId: mailFor.eventId, facts, recipients, hasSmtp: opts.hasSmtp });
              report.queuedMailIds.push(...m.queuedIds);
              report.digestItems += m.digestItems;
            }
            state = nextState(state, t);
            if (state.status === "none") alert = null;
          }
          if (dirty && alert) stays.push({ id: alert.id, ...dirty });
        }
      }
      opts.timer?.lap("alerts-evaluate");
      if (stays.length > 0) await writeStays(tx, stays);
      return report;
    },
    { timeoutMs: 300_000 },
  );
  opts.timer?.lap("alerts-write");
  return report;
}

/**
 * Evaluates and then, after commit, hands the mails to the job queue. The queue's own configuration
 * (startMailWorker) decides between SMTP and the outbox; if the queue cannot start, alerts are still
 * evaluated from the environment's settings and the mails wait as `queued` for the next worker start.
 */
export async function runAlerting(siteId: number, epochIds: readonly number[], timer?: PhaseTimer, opts: { onlyQueued?: boolean } = {}): Promise<EvaluationReport> {
  let config: MailConfig;
  let queueUp = true;
  try {
    config = (await startMailWorker()).config;
  } catch (err) {
    console.error("epochal: the job queue did not start; alert mails wait in the table", err);
    config = mailConfigFromEnv();
    queueUp = false;
  }
  const report = await evaluateAlerts(getDb(), siteId, epochIds, { hasSmtp: config.smtpUrl !== null, publicUrl: config.publicUrl, timer, onlyQueued: opts.onlyQueued });
  if (queueUp) {
    await enqueueMails(report.queuedMailIds);
    if (report.digestItems > 0) await scheduleDigest(siteId);
  }
  return report;
}
