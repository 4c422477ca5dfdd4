/**
 * `epochal serve` passes EPOCHAL_SERVER_HEAP_MB to the `next start` process as V8 heap flags
 * (node --max-old-space-size / --max-semi-space-size, Node.js command-line options), keeping any
 * NODE_OPTIONS the operator already set.
 */
import { describe, expect, it } from "vitest";
import { serverNodeOptions } from "../../../lib/server/cli/serve-core.ts";

describe("serverNodeOptions", () => {
  it("adds nothing without EPOCHAL_SERVER_HEAP_MB and keeps NODE_OPTIONS as it is", () => {
    expect(serverNodeOptions({})).toBeUndefined();
    expect(serverNodeOptions({ NODE_OPTIONS: "--enable-source-maps" })).toBe("--enable-source-maps");
  });
  it("caps the old space at the given megabytes and keeps the young generation small", () => {
    expect(serverNodeOptions({ EPOCHAL_SERVER_HEAP_MB: "192" })).toBe("--max-old-space-size=192 --max-semi-space-size=4");
    expect(serverNodeOptions({ EPOCHAL_SERVER_HEAP_MB: "256.7", NODE_OPTIONS: "--trace-warnings" })).toBe("--trace-warnings --max-old-space-size=256 --max-semi-space-size=4");
  });
  it("ignores values that are not a usable size", () => {
    for (const v of ["", "abc", "10", "-5", "NaN"]) expect(serverNodeOptions({ EPOCHAL_SERVER_HEAP_MB: v })).toBeUndefined();
  });
});
