/**
 * The text of alert mails (plain text, no I/O). Strain is shown in microstrain (µε = 1e-6), rates in
 * µε/day; times in the site's time zone (luxon); every mail ends with the caution.
 */
import { DateTime } from "luxon";
import { CAUTION_TEXT } from "../../caution.ts";
import { parseQuantity, QUANTITY_SENSE, type RuleLevels, type RuleQuantity, type TriggerLevel } from "../../triggers/rule.ts";

export type AlertMailFacts = {
  site: { slug: string; name: string; timeZone: string };
  element: { id: number; name: string; label: string; kind: string };
  rule: { name: string; quantity: RuleQuantity; levels: RuleLevels; hysteresis: number; response: string };
  eventKind: "open" | "escalate";
  fromLevel: TriggerLevel | null;
  level: TriggerLevel;
  /** The stored quantity (signed), dimensionless; a rate per day for rate rules. */
  value: number;
  sigma: number | null;
  isSignificant: boolean | null;
  time: Date;
  publicUrl: string;
};

const SENSE_TEXT = { value: "compared by value", negated: "contraction: compared as −value", magnitude: "compared by magnitude |value|" } as const;

/** Microstrain with a sensible number of decimals. */
export function formatMicrostrain(strain: number): string {
  const ue = strain * 1e6;
  const a = Math.abs(ue);
  const digits = a >= 100 ? 0 : a >= 10 ? 1 : 2;
  return ue.toFixed(digits);
}

export function formatSiteTime(time: Date, timeZone: string): string {
  const dt = DateTime.fromJSDate(time, { zone: timeZone });
  const shown = dt.isValid ? dt : DateTime.fromJSDate(time, { zone: "utc" });
  return `${shown.toFormat("yyyy-LL-dd HH:mm:ss")} ${shown.toFormat("ZZZZ")} (${shown.zoneName})`;
}

export function elementUrl(publicUrl: string, slug: string, elementId: number): string {
  return `${publicUrl.replace(/\/+$/, "")}/sites/${encodeURIComponent(slug)}/elements/${elementId}`;
}

export function alertSubject(f: AlertMailFacts): string {
  const verb = f.eventKind === "open" ? "opened" : `escalated from ${f.fromLevel?.toUpperCase() ?? "?"}`;
  return `[Epochal] ${f.level.toUpperCase()} ${verb}: ${f.site.name} — ${f.element.name} ${f.rule.quantity}`;
}

/** The lines that describe one alert event (used alone in a mail and as one item of a digest). */
export function alertLines(f: AlertMailFacts): string[] {
  const { base, isRate } = parseQuantity(f.rule.quantity);
  const unit = isRate ? "µε/day" : "µε";
  const sigma = f.sigma === null ? "σ unknown" : `± ${formatMicrostrain(f.sigma)} ${unit} (1σ)`;
  const signif = f.isSignificant === null ? "significance unknown" : f.isSignificant ? "significant at 95 %" : "NOT significant at 95 %";
  const lv = f.rule.levels;
  return [
    `Site: ${f.site.name} (${f.site.slug})`,
    `Element: ${f.element.name}${f.element.label ? ` — ${f.element.label}` : ""} (${f.element.kind})`,
    `Rule: ${f.rule.name}`,
    `Quantity: ${f.rule.quantity} (${SENSE_TEXT[QUANTITY_SENSE[base]]})`,
    `Value: ${formatMicrostrain(f.value)} ${unit} ${sigma}, ${signif}`,
    `Level: ${f.level.toUpperCase()}${f.eventKind === "escalate" && f.fromLevel ? ` (escalated from ${f.fromLevel})` : ""}; levels review ${formatMicrostrain(lv.review)}, alert ${formatMicrostrain(lv.alert)}, limit ${formatMicrostrain(lv.limit)} ${unit}, hysteresis ${formatMicrostrain(f.rule.hysteresis)} ${unit}`,
    `Time: ${formatSiteTime(f.time, f.site.timeZone)}`,
    `Response (${f.level}): ${f.rule.response.trim() || "(no response written for this level)"}`,
    `Element page: ${elementUrl(f.publicUrl, f.site.slug, f.element.id)}`,
  ];
}

export function alertBody(f: AlertMailFacts): string {
  return [...alertLines(f), "", CAUTION_TEXT, ""].join("\n");
}

/** A digest: one mail listing several events' texts (each item's body without its caution). */
export function digestSubject(site: { name: string }, count: number): string {
  return `[Epochal] Digest: ${count} alert event${count === 1 ? "" : "s"} on ${site.name}`;
}

export function digestBody(site: { name: string; slug: string }, items: readonly string[]): string {
  const parts = items.map((t, i) => `${i + 1}.\n${t.trim()}`);
  return [`Alert events on ${site.name} (${site.slug}) since the last digest:`, "", parts.join("\n\n"), "", CAUTION_TEXT, ""].join("\n");
}
