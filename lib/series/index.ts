/** Public API of the series core: views, downsampling, trends and forecasts. */
export * from "./increments.ts";
export * from "./displacement.ts";
export * from "./lttb.ts";
export * from "./trend.ts";
export * from "./inverse-velocity.ts";
export * from "./local-time.ts";
export * from "./packed.ts";
