/** Pure geometry and colour helpers of the site plan (no React, no DOM). */
export * from "./viewbox.ts";
export * from "./colour.ts";
export * from "./glyph.ts";
export * from "./nice.ts";
export * from "./units.ts";
export * from "./quantities.ts";
export * from "./field.ts";
export * from "./hull.ts";
export * from "./time.ts";
export * from "./wire.ts";
