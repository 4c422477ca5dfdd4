/**
 * Epochal's strain colour scale: diverging blue – paper white – orange, derived from the
 * colour-blind-safe set of Okabe & Ito (2008, "Color Universal Design"): blue #0072B2 and orange
 * #E69F00 at two thirds of the way out, darkened at the ends and lightened towards a warm white centre.
 * Lightness falls monotonically away from zero on both sides, so the magnitude also reads in grey.
 *
 *   contraction (−)  ◀──── blue ──── white ──── orange ────▶  extension (+)
 *
 * Colour never stands alone on the plan: extension and contraction also differ in shape (hatching,
 * "+"/"−" markers, glyph arrowheads).
 */

export type Rgb = [number, number, number];

/** Stops at t = −1, −2/3, −1/3, 0, 1/3, 2/3, 1. */
export const DIVERGING_STOPS: readonly string[] = ["#12467a", "#0072b2", "#9fcbe8", "#f4f1ea", "#f3c987", "#e69f00", "#8a3a00"];

/** Colour of elements without a value (not computed, missing point). */
export const NO_DATA_COLOUR = "#c9c4ba";

export function hexToRgb(hex: string): Rgb {
  const m = /^#?([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (!m) throw new Error(`not a #rrggbb colour: ${hex}`);
  return [parseInt(m[1], 16), parseInt(m[2], 16), parseInt(m[3], 16)];
}

export function rgbToHex(c: Rgb): string {
  return "#" + c.map((v) => Math.round(Math.min(255, Math.max(0, v))).toString(16).padStart(2, "0")).join("");
}

const STOPS_RGB = DIVERGING_STOPS.map(hexToRgb);

/** Colour at position t of the diverging scale; t is clamped to [−1, 1]; NaN gives NO_DATA_COLOUR. */
export function divergingColour(t: number): string {
  if (Number.isNaN(t)) return NO_DATA_COLOUR;
  const c = Math.min(1, Math.max(-1, t));
  const pos = ((c + 1) / 2) * (STOPS_RGB.length - 1);
  const i = Math.min(STOPS_RGB.length - 2, Math.floor(pos));
  const f = pos - i;
  const a = STOPS_RGB[i];
  const b = STOPS_RGB[i + 1];
  return rgbToHex([a[0] + (b[0] - a[0]) * f, a[1] + (b[1] - a[1]) * f, a[2] + (b[2] - a[2]) * f]);
}

/**
 * Colour of a value on a scale running from −domainMax to +domainMax (signed quantities) or from 0
 * to domainMax (unsigned ones such as maximum shear, which use the orange half only). Values beyond
 * the domain take the end colour; null or non-finite values take NO_DATA_COLOUR.
 */
export function colourForValue(value: number | null, domainMax: number, signed = true): string {
  if (value === null || !Number.isFinite(value)) return NO_DATA_COLOUR;
  if (!(domainMax > 0)) return divergingColour(0);
  const t = value / domainMax;
  return divergingColour(signed ? t : Math.max(0, t));
}

/** Relative luminance (WCAG 2.1 definition) of a #rrggbb colour, in [0, 1]. */
export function relativeLuminance(hex: string): number {
  const [r, g, b] = hexToRgb(hex).map((v) => {
    const s = v / 255;
    return s <= 0.04045 ? s / 12.92 : Math.pow((s + 0.055) / 1.055, 2.4);
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** Ink for text or markers drawn on a fill: near-black on light fills, white on dark ones (WCAG contrast). */
export function inkOn(fill: string): string {
  const l = relativeLuminance(fill);
  // Contrast with black (l+0.05)/0.05 against white 1.05/(l+0.05): pick the larger.
  return (l + 0.05) / 0.05 >= 1.05 / (l + 0.05) ? "#1f2a33" : "#ffffff";
}

/** `n` evenly spaced legend entries from −domainMax to +domainMax (or 0 to domainMax when unsigned). */
export function legendStops(domainMax: number, n: number, signed = true): { value: number; colour: string }[] {
  if (n < 2) throw new Error("a legend needs at least two stops");
  const lo = signed ? -domainMax : 0;
  const out: { value: number; colour: string }[] = [];
  for (let i = 0; i < n; i++) {
    const value = lo + ((domainMax - lo) * i) / (n - 1);
    out.push({ value, colour: colourForValue(value, domainMax, signed) });
  }
  return out;
}
