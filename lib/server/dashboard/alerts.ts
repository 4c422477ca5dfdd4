/**
 * Alerts across the sites a user may read, with filters (level at least, site, element, state), and
 * the mail outbox (messages kept because no SMTP server is configured). The alerts service
 * (lib/server/alerts/alerts.ts) owns one site's alerts and acknowledgement; this read model adds the
 * cross-site view the dashboard needs.
 */
import "server-only";
import { getDb } from "../db/client.ts";
import { alertsSettled } from "../alerts/pending.ts";
import { LEVELS, levelRank, type TriggerLevel } from "../../triggers/rule.ts";

export type AlertStateFilter = "open" | "cleared" | "all";

export interface AlertRow {
  id: number;
  siteId: number;
  siteSlug: string;
  siteName: string;
  timeZone: string;
  ruleName: string;
  quantity: string;
  elementId: number;
  elementName: string;
  level: string;
  peakLevel: string;
  openedAtMs: number;
  value: number;
  sigma: number | null;
  isSignificant: boolean;
  clearedAtMs: number | null;
  acknowledgedAtMs: number | null;
  acknowledgedBy: string | null;
  ackComment: string | null;
}

export async function listAlertsAcross(
  siteIds: number[],
  q: { state: AlertStateFilter; minLevel?: TriggerLevel; elementId?: number; limit?: number },
): Promise<AlertRow[]> {
  if (siteIds.length === 0) return [];
  await alertsSettled(siteIds);
  const levels = q.minLevel ? LEVELS.filter((l) => levelRank(l) >= levelRank(q.minLevel!)) : undefined;
  const rows = await getDb().alert.findMany({
    where: {
      siteId: { in: siteIds },
      ...(q.state === "open" ? { clearedAt: null } : q.state === "cleared" ? { clearedAt: { not: null } } : {}),
      ...(levels ? { level: { in: [...levels] } } : {}),
      ...(q.elementId ? { elementId: q.elementId } : {}),
    },
    include: { rule: { select: { name: true, quantity: true } }, element: { select: { name: true } }, site: { select: { slug: true, name: true, timeZone: true } } },
    orderBy: [{ openedAt: "desc" }, { id: "desc" }],
    take: q.limit ?? 300,
  });
  return rows.map((a) => ({
    id: a.id,
    siteId: a.siteId,
    siteSlug: a.site.slug,
    siteName: a.site.name,
    timeZone: a.site.timeZone,
    ruleName: a.rule.name,
    quantity: a.rule.quantity,
    elementId: a.elementId,
    elementName: a.element.name,
    level: a.level,
    peakLevel: a.peakLevel,
    openedAtMs: a.openedAt.getTime(),
    value: a.value,
    sigma: a.sigma,
    isSignificant: a.isSignificant,
    clearedAtMs: a.clearedAt?.getTime() ?? null,
    acknowledgedAtMs: a.acknowledgedAt?.getTime() ?? null,
    acknowledgedBy: a.acknowledgedBy,
    ackComment: a.ackComment,
  }));
}

export interface OutboxRow {
  id: number;
  siteSlug: string;
  alertId: number | null;
  recipients: string[];
  subject: string;
  body: string;
  status: string;
  createdAtMs: number;
  timeZone: string;
}

/** Mails held in the outbox (no SMTP configured) and failed ones, newest first. */
export async function listOutboxAcross(siteIds: number[], limit = 50): Promise<OutboxRow[]> {
  if (siteIds.length === 0) return [];
  await alertsSettled(siteIds);
  const rows = await getDb().mailMessage.findMany({
    where: { siteId: { in: siteIds }, status: { in: ["outbox", "failed"] } },
    include: { site: { select: { slug: true, timeZone: true } } },
    orderBy: { id: "desc" },
    take: limit,
  });
  return rows.map((m) => ({ id: m.id, siteSlug: m.site.slug, alertId: m.alertId, recipients: m.recipients, subject: m.subject, body: m.body, status: m.status, createdAtMs: m.createdAt.getTime(), timeZone: m.site.timeZone }));
}
