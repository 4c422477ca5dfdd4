/** Public API of the strain engine. */
export * from "./types.ts";
export { computeTriangleStrain, DEFAULT_CONFIDENCE } from "./triangle.ts";
export { computeSurfaceTriangleStrain, planeBasis } from "./surface.ts";
export { computeBaselineStrain } from "./baseline.ts";
export { computeGroupStrain, type GroupOptions } from "./group.ts";
export { computeElementStrain, defaultMode, isModeOf, type ElementSpec, type ElementJson, type ElementOkJson, type ElementFailureJson } from "./element.ts";
export { computeTriangleBatch, createTriangleBatchOut, BATCH_OK, BATCH_DEGENERATE, BATCH_NON_FINITE, type TriangleBatchOut, type TriangleBatchInput } from "./batch.ts";
export { normalQuantile, twoSidedK } from "./normal-quantile.ts";
