/**
 * `epochal serve` gives the `next start` process a 32 MB young generation by default, and passes
 * EPOCHAL_SERVER_HEAP_MB to it as V8 heap flags
 * (node --max-old-space-size / --max-semi-space-size, Node.js command-line options), keeping any
 * NODE_OPTIONS the operator already set.
 */
import { describe, expect, it } from "vitest";
import { serverNodeOptions } from "../../../lib/server/cli/serve-core.ts";

describe("serverNodeOptions", () => {
  it("without EPOCHAL_SERVER_HEAP_MB lets the young generation grow to 32 MB semi-spaces, keeping NODE_OPTIONS", () => {
    expect(serverNodeOptions({})).toBe("--max-semi-space-size=32");
    expect(serverNodeOptions({ NODE_OPTIONS: "--enable-source-maps" })).toBe("--enable-source-maps --max-semi-space-size=32");
    // The operator's own young-generation size wins.
    expect(serverNodeOptions({ NODE_OPTIONS: "--max-semi-space-size=8" })).toBe("--max-semi-space-size=8");
  });
  it("caps the old space at the given megabytes and keeps the young generation small", () => {
    expect(serverNodeOptions({ EPOCHAL_SERVER_HEAP_MB: "192" })).toBe("--max-old-space-size=192 --max-semi-space-size=4");
    expect(serverNodeOptions({ EPOCHAL_SERVER_HEAP_MB: "256.7", NODE_OPTIONS: "--trace-warnings" })).toBe("--trace-warnings --max-old-space-size=256 --max-semi-space-size=4");
  });
  it("ignores values that are not a usable size", () => {
    for (const v of ["", "abc", "10", "-5", "NaN"]) expect(serverNodeOptions({ EPOCHAL_SERVER_HEAP_MB: v })).toBe("--max-semi-space-size=32");
  });
});
