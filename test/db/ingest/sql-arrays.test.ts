/**
 * The bulk-statement array parameters read back by a real PostgreSQL exactly as sent: the binary
 * forms (array_recv layout, PostgreSQL documentation "Arrays" and src/backend/utils/adt/arrayfuncs.c)
 * and the text literals, for the values ingest and results send (nulls, signed zero, extremes of
 * float8 and int4, an empty array).
 */
import { afterAll, describe, expect, it } from "vitest";
import { floatArray, floatArrayBinary, intArray, intArrayBinary, textArray } from "../../../lib/server/ingest/sql-arrays.ts";
import { closeIngestPools, pgQuery, withPgTransaction } from "../../../lib/server/ingest/pg-tx.ts";
import { writeCopyBinary } from "../../../lib/formats/pg-copy-binary.ts";

afterAll(async () => {
  await closeIngestPools();
});

const FLOATS: (number | null)[] = [0, -0, 1.5, -2e-7, Number.MIN_VALUE, Number.MAX_VALUE, -Number.MAX_VALUE, 0.1 + 0.2, null, 5_000_000.123456789, Math.PI];
const INTS: (number | null)[] = [0, 1, -1, 2147483647, -2147483648, null, 42];

describe("array parameters for bulk statements", () => {
  it("float8[] in binary and text form come back as the same doubles, in order, with NULLs", async () => {
    const [r] = await pgQuery<{ b: (number | null)[]; t: (number | null)[] }>(`SELECT $1::float8[] AS b, $2::float8[] AS t`, [floatArrayBinary(FLOATS), floatArray(FLOATS)]);
    expect(r.b).toEqual(FLOATS);
    // The text literal prints −0 as 0 (JavaScript's String(−0)); every other value is the same double.
    expect(r.t).toEqual(FLOATS.map((v) => (Object.is(v, -0) ? 0 : v)));
    // Signed zero survives the binary path bit for bit (text prints both as 0).
    const [z] = await pgQuery<{ s: string }>(`SELECT float8send(($1::float8[])[1])::text AS s`, [floatArrayBinary([-0])]);
    expect(z.s).toBe("\\x8000000000000000");
  });

  it("int4[] in binary and text form come back equal, including the int4 extremes and NULL", async () => {
    const [r] = await pgQuery<{ b: (number | null)[]; t: (number | null)[] }>(`SELECT $1::int[] AS b, $2::int[] AS t`, [intArrayBinary(INTS), intArray(INTS)]);
    expect(r.b).toEqual(INTS);
    expect(r.t).toEqual(INTS);
  });

  it("empty arrays unnest to no rows, and columns of different kinds unnest side by side", async () => {
    const [e] = await pgQuery<{ n: number }>(`SELECT count(*)::int AS n FROM unnest($1::float8[], $2::int[])`, [floatArrayBinary([]), intArrayBinary([])]);
    expect(e.n).toBe(0);
    const rows = await pgQuery<{ i: number; f: number | null; s: string }>(`SELECT * FROM unnest($1::int[], $2::float8[], $3::text[]) AS u(i, f, s)`, [intArrayBinary([7, 8]), floatArrayBinary([null, 2.25]), textArray(["a\"b", "c\\d"])]);
    expect(rows).toEqual([{ i: 7, f: null, s: "a\"b" }, { i: 8, f: 2.25, s: "c\\d" }]);
  });

  it("typed-array columns: Float64Array with NaN as NULL (nanIsNull) and Int32Array come back as sent", async () => {
    const f = new Float64Array([1.25, Number.NaN, -0, 3e-9, Number.NaN]);
    const ints = new Int32Array([5, -6, 2147483647]);
    const [r] = await pgQuery<{ f: (number | null)[]; i: number[]; nulls: number }>(`SELECT $1::float8[] AS f, $2::int[] AS i, (SELECT count(*) FROM unnest($1::float8[]) x WHERE x IS NULL)::int AS nulls`, [
      floatArrayBinary(f, { nanIsNull: true }),
      intArrayBinary(ints),
    ]);
    expect(r.f).toEqual([1.25, null, -0, 3e-9, null]);
    expect(r.nulls).toBe(2);
    expect(r.i).toEqual([5, -6, 2147483647]);
    // A subarray sends only its own slots.
    const [s] = await pgQuery<{ f: number[] }>(`SELECT $1::float8[] AS f`, [floatArrayBinary(f.subarray(2, 4), { nanIsNull: true })]);
    expect(s.f).toEqual([-0, 3e-9]);
    // Infinity is still refused with nanIsNull.
    expect(() => floatArrayBinary(new Float64Array([Number.POSITIVE_INFINITY]), { nanIsNull: true })).toThrow(RangeError);
  });

  it("binary COPY FROM STDIN (writeCopyBinary): every value comes back as written, NaN as NULL, text and times exact", async () => {
    const times = ["2024-02-29T23:59:59.999Z", "1999-12-31T23:59:59.999Z", "2000-01-01T00:00:00.000Z"];
    const got = await withPgTransaction(async (sql) => {
      await sql.query(`CREATE TEMP TABLE copy_check (i int4, f float8, t text, ts timestamptz) ON COMMIT DROP`);
      const data = writeCopyBinary(
        [
          { type: "int4", values: Int32Array.from([2147483647, -2147483648, 0]) },
          { type: "float8", values: Float64Array.from([-0, Number.NaN, Number.MAX_VALUE]) },
          { type: "text", values: ["ok", null, "Δ, \"quoted\"\ttab"] },
          { type: "timestamptz", values: times },
        ],
        0,
        3,
      );
      const n = await sql.copyFrom(`COPY copy_check (i, f, t, ts) FROM STDIN (FORMAT binary)`, data);
      const rows = await sql.query<{ i: number; f: number | null; neg: boolean; t: string | null; ts: Date }>(`SELECT i, f, f::text = '-0' AS neg, t, ts FROM copy_check ORDER BY i DESC`);
      return { n, rows };
    });
    expect(got.n).toBe(3);
    expect(got.rows.map((r) => [r.i, r.f, r.t, r.ts.toISOString()])).toEqual([
      [2147483647, -0, "ok", times[0]],
      [0, Number.MAX_VALUE, "Δ, \"quoted\"\ttab", times[2]],
      [-2147483648, null, null, times[1]],
    ]);
    expect(got.rows[0].neg).toBe(true);
  });

  it("COPY from a producer: a stream sent in parts cut anywhere (even inside a row) is stored whole", async () => {
    const n = 500;
    const data = writeCopyBinary([{ type: "int4", values: Int32Array.from({ length: n }, (_, i) => i) }, { type: "float8", values: Float64Array.from({ length: n }, (_, i) => i / 7) }], 0, n);
    const got = await withPgTransaction(async (sql) => {
      await sql.query(`CREATE TEMP TABLE produced (i int4, f float8) ON COMMIT DROP`);
      const stored = await sql.copyFromProducer(`COPY produced (i, f) FROM STDIN (FORMAT binary)`, (send) => {
        for (const [a, b] of [[0, 7], [7, 100], [100, 1001], [1001, data.byteLength]]) send(data.subarray(a, b));
      });
      const rows = await sql.query<{ i: number; f: number }>(`SELECT i, f FROM produced ORDER BY i`);
      return { stored, rows };
    });
    expect(got.stored).toBe(n);
    expect(got.rows.every((r, k) => r.i === k && r.f === k / 7)).toBe(true);
  });

  it("COPY from a producer that throws half way: that error comes back, nothing is stored, the pool goes on", async () => {
    await pgQuery(`CREATE TABLE IF NOT EXISTS produced_fail (i int4)`);
    await pgQuery(`TRUNCATE produced_fail`);
    const data = writeCopyBinary([{ type: "int4", values: Int32Array.from([1, 2, 3]) }], 0, 3);
    const failure = new Error("the producer failed after its first part");
    await expect(
      withPgTransaction(async (sql) => {
        await sql.query(`INSERT INTO produced_fail VALUES (0)`);
        return sql.copyFromProducer(`COPY produced_fail (i) FROM STDIN (FORMAT binary)`, (send) => {
          send(data.subarray(0, 30));
          throw failure;
        });
      }),
    ).rejects.toBe(failure);
    expect(await pgQuery<{ n: number }>(`SELECT count(*)::int AS n FROM produced_fail`)).toEqual([{ n: 0 }]);
    for (let k = 0; k < 5; k++) expect(await withPgTransaction((sql) => sql.query<{ one: number }>(`SELECT 1 AS one`))).toEqual([{ one: 1 }]);
    await pgQuery(`DROP TABLE produced_fail`);
  });

  it("refuses values the columns cannot hold before anything is sent", () => {
    expect(() => floatArrayBinary([1, Number.NaN])).toThrow(RangeError);
    expect(() => floatArrayBinary([Number.POSITIVE_INFINITY])).toThrow(RangeError);
    expect(() => intArrayBinary([2147483648])).toThrow(RangeError);
    expect(() => intArrayBinary([1.5])).toThrow(RangeError);
  });
});
