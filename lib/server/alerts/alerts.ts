/**
 * Reading and acknowledging alerts. Acknowledgement is by a person (a signed-in user with the
 * "acknowledge" permission) with a required comment; it is an AlertEvent and an audit row, and it can
 * be repeated (each comment is kept; the Alert holds the latest). It stops further mails for that
 * alert; its escalations are still recorded.
 *
 * Alert states shown: `watch` (uncleared, never yet significant: shown as "not significant"),
 * `open` (uncleared), `cleared`.
 */
import "server-only";
import { getDb, type Db } from "../db/client.ts";
import { AppError } from "../errors.ts";
import { recordAudit } from "../audit.ts";
import type { Alert, AlertEvent } from "../db/generated/client.ts";
import { LEVELS, levelRank, type TriggerLevel } from "../../triggers/rule.ts";
import { alertsSettled } from "./pending.ts";

export type AlertStateName = "watch" | "open" | "cleared";

export function alertStateOf(a: Pick<Alert, "clearedAt" | "isSignificant">): AlertStateName {
  return a.clearedAt ? "cleared" : a.isSignificant ? "open" : "watch";
}

export type AlertEventJson = { id: string; at: string; kind: string; level: string | null; value: number | null; actor: string | null; comment: string | null };

export function alertEventJson(e: AlertEvent): AlertEventJson {
  return { id: e.id.toString(), at: e.at.toISOString(), kind: e.kind, level: e.level, value: e.value, actor: e.actor, comment: e.comment };
}

type AlertWithNames = Alert & { rule: { name: string; quantity: string }; element: { name: string; label: string; kind: string } };

export function alertJson(a: AlertWithNames, events?: AlertEvent[]) {
  return {
    id: a.id,
    state: alertStateOf(a),
    ruleId: a.ruleId,
    ruleName: a.rule.name,
    quantity: a.rule.quantity,
    elementId: a.elementId,
    elementName: a.element.name,
    elementLabel: a.element.label,
    elementKind: a.element.kind,
    level: a.level,
    peakLevel: a.peakLevel,
    openedAt: a.openedAt.toISOString(),
    openedEpochId: a.openedEpochId,
    lastEpochId: a.lastEpochId,
    value: a.value,
    sigma: a.sigma,
    isSignificant: a.isSignificant,
    clearedAt: a.clearedAt?.toISOString() ?? null,
    acknowledgedAt: a.acknowledgedAt?.toISOString() ?? null,
    acknowledgedBy: a.acknowledgedBy,
    ackComment: a.ackComment,
    ...(events ? { events: events.map(alertEventJson) } : {}),
  };
}

const withNames = { rule: { select: { name: true, quantity: true } }, element: { select: { name: true, label: true, kind: true } } } as const;

/** `level` filters to alerts whose current level is at least that level. Newest first. */
export async function listAlerts(
  siteId: number,
  q: { state: "open" | "watch" | "cleared" | "all"; level?: TriggerLevel; limit: number },
  db: Db = getDb(),
): Promise<AlertWithNames[]> {
  const where =
    q.state === "open"
      ? { clearedAt: null }
      : q.state === "watch"
        ? { clearedAt: null, isSignificant: false }
        : q.state === "cleared"
          ? { clearedAt: { not: null } }
          : {};
  const levels = q.level ? LEVELS.filter((l) => levelRank(l) >= levelRank(q.level!)) : undefined;
  await alertsSettled(siteId);
  return db.alert.findMany({
    where: { siteId, ...where, ...(levels ? { level: { in: [...levels] } } : {}) },
    include: withNames,
    orderBy: [{ openedAt: "desc" }, { id: "desc" }],
    take: q.limit,
  });
}

export async function getAlert(siteId: number, id: number, db: Db = getDb()): Promise<{ alert: AlertWithNames; events: AlertEvent[] }> {
  await alertsSettled(siteId);
  const alert = await db.alert.findFirst({ where: { id, siteId }, include: withNames });
  if (!alert) throw new AppError("not_found", `No alert ${id} on this site.`);
  const events = await db.alertEvent.findMany({ where: { alertId: id }, orderBy: { id: "asc" } });
  return { alert, events };
}

export async function acknowledgeAlert(
  siteId: number,
  id: number,
  comment: string,
  actor: { kind: string; label: string },
  db: Db = getDb(),
): Promise<{ alert: AlertWithNames; events: AlertEvent[] }> {
  if (actor.kind !== "user") throw new AppError("forbidden", "Alerts are acknowledged by a person: sign in.");
  const text = comment.trim();
  if (!text) throw new AppError("invalid", "comment: A comment is required to acknowledge an alert.", { errors: [{ line: null, field: "comment", message: "required" }] });
  await db.$transaction(async (tx) => {
    // Lock the row so an acknowledgement and an evaluation of the same alert are ordered.
    const locked = await tx.$queryRaw<{ id: number }[]>`SELECT id FROM "Alert" WHERE id = ${id} AND "siteId" = ${siteId} FOR UPDATE`;
    if (locked.length === 0) throw new AppError("not_found", `No alert ${id} on this site.`);
    const before = await tx.alert.findUniqueOrThrow({ where: { id } });
    const now = new Date();
    const after = await tx.alert.update({ where: { id }, data: { acknowledgedAt: now, acknowledgedBy: actor.label, ackComment: text } });
    await tx.alertEvent.create({ data: { alertId: id, at: now, kind: "acknowledge", level: after.level, value: null, actor: actor.label, comment: text } });
    await recordAudit(tx, { actor: actor.label, siteId, action: "alert.acknowledge", entityType: "Alert", entityId: String(id), before, after });
  });
  return getAlert(siteId, id, db);
}
