/**
 * The malformed-file corpus: every file in test/fixtures/ingest/bad/ is posted and must be answered
 * as test/fixtures/ingest/bad/expected.json says, naming the right line and field, with nothing stored.
 */
import { readFileSync, readdirSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { CT, counts, makeSite, post } from "./helpers.ts";

const dir = new URL("../../fixtures/ingest/bad/", import.meta.url);
const manifest = JSON.parse(readFileSync(new URL("expected.json", dir), "utf8")) as {
  files: Record<string, { status: number; line: number | null; field: string | null; query?: string }>;
};
const onDisk = readdirSync(dir).filter((f) => f !== "expected.json");

function typeOf(file: string): string {
  if (file.endsWith(".csv")) return CT.csv;
  if (file.endsWith(".geojson")) return CT.geojson;
  return CT.json;
}

describe("malformed epoch files", () => {
  it("the manifest lists every file of the corpus (at least 30) and no file that is missing", () => {
    expect(onDisk.length).toBeGreaterThanOrEqual(30);
    expect(Object.keys(manifest.files).sort()).toEqual([...onDisk].sort());
  });

  for (const [file, want] of Object.entries(manifest.files)) {
    it(`POST ${file} answers ${want.status} naming line ${want.line} and field ${want.field}, storing nothing`, async () => {
      const s = await makeSite({ originLatDeg: 47, originLonDeg: 8, originHeightM: 500 });
      const body = readFileSync(new URL(file, dir), "utf8");
      const r = await post(s.slug, body, { token: s.ingestToken, type: typeOf(file), query: want.query });
      expect(r.status).toBe(want.status);
      const errors = r.json.errors as { line: number | null; field: string | null; message: string }[];
      expect(errors.length).toBeGreaterThan(0);
      expect({ line: errors[0].line, field: errors[0].field }).toEqual({ line: want.line, field: want.field });
      expect(errors[0].message.length).toBeGreaterThan(5);
      expect(await counts(s.id)).toMatchObject({ epochs: 0, points: 0 });
    });
  }
});
