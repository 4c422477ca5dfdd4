/**
 * Trigger rules: create, edit, disable (never delete). Every change writes an audit row in the same
 * transaction (who, when, before, after). Disabling a rule clears its open alerts with an event
 * "rule-disabled", so no alert stays open that nothing will ever evaluate again; the history stays.
 */
import { getDb, type Db } from "./db/client.ts";
import { AppError, type FieldError } from "./errors.ts";
import { recordAudit } from "./audit.ts";
import type { TriggerRule } from "./db/generated/client.ts";
import type { RuleCreateInput, RulePatchInput } from "./schemas/rules.ts";
import { findPreset } from "../triggers/presets.ts";
import { checkRuleLevels, isRuleQuantity, parseQuantity, QUANTITY_ELEMENT_KINDS, type RuleQuantity } from "../triggers/rule.ts";

export type RuleJson = {
  id: number;
  siteId: number;
  name: string;
  quantity: string;
  elementIds: number[];
  reviewLevel: number;
  alertLevel: number;
  limitLevel: number;
  hysteresis: number;
  significantOnly: boolean;
  responseReview: string;
  responseAlert: string;
  responseLimit: string;
  preset: string | null;
  enabled: boolean;
  createdAt: string;
  updatedAt: string;
};

export function ruleJson(r: TriggerRule): RuleJson {
  return {
    id: r.id,
    siteId: r.siteId,
    name: r.name,
    quantity: r.quantity,
    elementIds: r.elementIds,
    reviewLevel: r.reviewLevel,
    alertLevel: r.alertLevel,
    limitLevel: r.limitLevel,
    hysteresis: r.hysteresis,
    significantOnly: r.significantOnly,
    responseReview: r.responseReview,
    responseAlert: r.responseAlert,
    responseLimit: r.responseLimit,
    preset: r.preset,
    enabled: r.enabled,
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
  };
}

function invalid(errors: FieldError[]): AppError {
  return new AppError("invalid", errors.map((e) => (e.field ? `${e.field}: ${e.message}` : e.message)).join("; "), { errors });
}

type RuleFields = {
  name: string;
  quantity: RuleQuantity;
  elementIds: number[];
  reviewLevel: number;
  alertLevel: number;
  limitLevel: number;
  hysteresis: number;
  significantOnly: boolean;
  responseReview: string;
  responseAlert: string;
  responseLimit: string;
};

type Tx = Parameters<Parameters<Db["$transaction"]>[0]>[0];

/** Levels rise, elements exist on the site, and the quantity exists for each element's kind. */
async function checkRule(tx: Tx, siteId: number, r: RuleFields): Promise<void> {
  const errors: FieldError[] = checkRuleLevels({ review: r.reviewLevel, alert: r.alertLevel, limit: r.limitLevel }, r.hysteresis).map((e) => ({
    line: null,
    ...e,
  }));
  const ids = [...new Set(r.elementIds)];
  if (ids.length !== r.elementIds.length) errors.push({ line: null, field: "elementIds", message: "an element is listed twice" });
  const found = await tx.element.findMany({ where: { siteId, id: { in: ids } }, select: { id: true, name: true, kind: true } });
  const byId = new Map(found.map((e) => [e.id, e]));
  const missing = ids.filter((id) => !byId.has(id));
  if (missing.length) errors.push({ line: null, field: "elementIds", message: `no element ${missing.join(", ")} on this site` });
  const kinds = QUANTITY_ELEMENT_KINDS[parseQuantity(r.quantity).base];
  const wrong = found.filter((e) => !kinds.includes(e.kind));
  if (wrong.length)
    errors.push({
      line: null,
      field: "quantity",
      message: `${r.quantity} does not exist for ${wrong.map((e) => `${e.name} (${e.kind})`).join(", ")}; it is for ${kinds.join(" and ")} elements`,
    });
  if (errors.length) throw invalid(errors);
}

export async function listRules(siteId: number, db: Db = getDb()): Promise<TriggerRule[]> {
  return db.triggerRule.findMany({ where: { siteId }, orderBy: { id: "asc" } });
}

export async function getRule(siteId: number, id: number, db: Db = getDb()): Promise<TriggerRule> {
  const r = await db.triggerRule.findFirst({ where: { id, siteId } });
  if (!r) throw new AppError("not_found", `No rule ${id} on this site.`);
  return r;
}

export async function createRule(siteId: number, input: RuleCreateInput, actor: { label: string }, db: Db = getDb()): Promise<TriggerRule> {
  const preset = input.preset === undefined ? null : findPreset(input.preset);
  if (input.preset !== undefined && !preset) throw invalid([{ line: null, field: "preset", message: `unknown preset "${input.preset}"` }]);
  const quantity = input.quantity ?? preset?.quantity;
  const missing: FieldError[] = [];
  if (!quantity) missing.push({ line: null, field: "quantity", message: "required (or give a preset)" });
  const reviewLevel = input.reviewLevel ?? preset?.levels.review;
  const alertLevel = input.alertLevel ?? preset?.levels.alert;
  const limitLevel = input.limitLevel ?? preset?.levels.limit;
  if (reviewLevel === undefined) missing.push({ line: null, field: "reviewLevel", message: "required (or give a preset)" });
  if (alertLevel === undefined) missing.push({ line: null, field: "alertLevel", message: "required (or give a preset)" });
  if (limitLevel === undefined) missing.push({ line: null, field: "limitLevel", message: "required (or give a preset)" });
  if (missing.length || !quantity || reviewLevel === undefined || alertLevel === undefined || limitLevel === undefined) throw invalid(missing);
  if (!isRuleQuantity(quantity)) throw invalid([{ line: null, field: "quantity", message: `unknown quantity ${quantity}` }]);
  const fields: RuleFields = {
    name: input.name,
    quantity,
    elementIds: input.elementIds,
    reviewLevel,
    alertLevel,
    limitLevel,
    hysteresis: input.hysteresis ?? preset?.hysteresis ?? 0,
    significantOnly: input.significantOnly ?? preset?.significantOnly ?? true,
    responseReview: input.responseReview ?? preset?.responses.review ?? "",
    responseAlert: input.responseAlert ?? preset?.responses.alert ?? "",
    responseLimit: input.responseLimit ?? preset?.responses.limit ?? "",
  };
  return db.$transaction(async (tx) => {
    await checkRule(tx, siteId, fields);
    const rule = await tx.triggerRule.create({ data: { siteId, ...fields, preset: preset?.id ?? null, enabled: input.enabled ?? true } });
    await recordAudit(tx, { actor: actor.label, siteId, action: "rule.create", entityType: "TriggerRule", entityId: String(rule.id), after: rule });
    return rule;
  });
}

export async function updateRule(siteId: number, id: number, patch: RulePatchInput, actor: { label: string }, db: Db = getDb()): Promise<TriggerRule> {
  return db.$transaction(async (tx) => {
    const before = await tx.triggerRule.findFirst({ where: { id, siteId } });
    if (!before) throw new AppError("not_found", `No rule ${id} on this site.`);
    const quantity = patch.quantity ?? before.quantity;
    if (!isRuleQuantity(quantity)) throw invalid([{ line: null, field: "quantity", message: `unknown quantity ${quantity}` }]);
    const fields: RuleFields = {
      name: patch.name ?? before.name,
      quantity,
      elementIds: patch.elementIds ?? before.elementIds,
      reviewLevel: patch.reviewLevel ?? before.reviewLevel,
      alertLevel: patch.alertLevel ?? before.alertLevel,
      limitLevel: patch.limitLevel ?? before.limitLevel,
      hysteresis: patch.hysteresis ?? before.hysteresis,
      significantOnly: patch.significantOnly ?? before.significantOnly,
      responseReview: patch.responseReview ?? before.responseReview,
      responseAlert: patch.responseAlert ?? before.responseAlert,
      responseLimit: patch.responseLimit ?? before.responseLimit,
    };
    await checkRule(tx, siteId, fields);
    const enabled = patch.enabled ?? before.enabled;
    const rule = await tx.triggerRule.update({ where: { id }, data: { ...fields, enabled } });
    const action = before.enabled && !enabled ? "rule.disable" : !before.enabled && enabled ? "rule.enable" : "rule.update";
    await recordAudit(tx, { actor: actor.label, siteId, action, entityType: "TriggerRule", entityId: String(id), before, after: rule });
    if (before.enabled && !enabled) {
      const open = await tx.alert.findMany({ where: { ruleId: id, clearedAt: null }, select: { id: true, level: true } });
      const now = new Date();
      for (const a of open) {
        await tx.alert.update({ where: { id: a.id }, data: { clearedAt: now } });
        await tx.alertEvent.create({ data: { alertId: a.id, at: now, kind: "rule-disabled", level: a.level, actor: actor.label, comment: "Rule disabled; alert closed." } });
      }
    }
    return rule;
  });
}
