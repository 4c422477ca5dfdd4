/**
 * Writing element result rows (ResultColumns, columns.ts) of new epochs with binary COPY, in the
 * caller's transaction.
 */
import { STORED_VALUE_KEYS } from "../../strain/stored-values.ts";
import type { Sql } from "../ingest/pg-tx.ts";
import { writeCopyBinary, type CopyColumn } from "../../formats/pg-copy-binary.ts";
import type { PhaseTimer } from "../timing.ts";
import type { ResultColumns } from "./columns.ts";

/** Rows per statement. */
const RESULT_CHUNK = 50_000;

const RESULT_COLUMNS = ["elementId", "epochId", "referenceEpochId", "time", "status", ...STORED_VALUE_KEYS].map((c) => `"${c}"`).join(", ");

/**
 * New rows go in with `COPY … FROM STDIN (FORMAT binary)`: measured on a live epoch's 3,922 rows it
 * costs the server less than INSERT … SELECT FROM unnest(…) of the same binary arrays (no function
 * scan, batched heap inserts). COPY has no ON CONFLICT: it is for rows of epochs stored in the
 * same transaction, which cannot exist yet.
 */
export async function copyResultRows(tx: Sql, rows: ResultColumns, timer?: PhaseTimer): Promise<void> {
  const columns = columnsOf(rows);
  for (let i = 0; i < rows.length; i += RESULT_CHUNK) {
    const j = Math.min(rows.length, i + RESULT_CHUNK);
    const data = writeCopyBinary(columns, i, j);
    timer?.lap("results-encode");
    const n = await tx.copyFrom(`COPY "ElementResult" (${RESULT_COLUMNS}) FROM STDIN (FORMAT binary)`, data);
    if (n !== j - i) throw new Error(`results: COPY stored ${n} rows of ${j - i}`);
    timer?.lap("results-insert");
  }
}

/** Rows up to which `streamResultRows` is used (one statement; a live epoch has one row per element). */
export const STREAM_ROWS = RESULT_CHUNK;

function columnsOf(rows: ResultColumns): CopyColumn[] {
  return [
    { type: "int4", values: rows.elementId },
    { type: "int4", values: rows.epochId },
    { type: "int4", values: rows.referenceEpochId },
    { type: "timestamptz", values: rows.timeIso },
    { type: "text", values: rows.status },
    ...STORED_VALUE_KEYS.map((k): CopyColumn => ({ type: "float8", values: rows.values[k] })),
  ];
}

/** Bytes of a binary COPY stream's header (signature, flags, extension length) and trailer. */
const HEADER_BYTES = 19;
const TRAILER_BYTES = 2;

/**
 * Computes rows and stores them in one COPY statement at the same time: `compute` calls its
 * `onRows` whenever more rows are in the columns (the first `upTo` of them, when given), and each
 * new part is encoded and goes to the server at once, so the server inserts while the rest is
 * computed (or, for rows computed beforehand, encoded). For a live epoch's rows (one statement's worth).
 * Laps: `computeLap` when `compute` returns, results-insert when the server has stored all.
 */
export async function streamResultRows(
  tx: Sql,
  compute: (onRows: (rows: ResultColumns, upTo?: number) => void) => ResultColumns,
  timer?: PhaseTimer,
  /** The lap taken when `compute` returns (results-encode when it only hands on rows computed before). */
  computeLap = "results-compute",
): Promise<ResultColumns> {
  let done: ResultColumns | null = null;
  const n = await tx.copyFromProducer(`COPY "ElementResult" (${RESULT_COLUMNS}) FROM STDIN (FORMAT binary)`, (send) => {
    let sent = 0;
    // One stream: the header with the first part, the trailer after the last. Rows [sent, upTo) go now.
    const flush = (rows: ResultColumns, last: boolean, upTo = rows.length): void => {
      if (upTo <= sent && !last) return;
      const bytes = writeCopyBinary(columnsOf(rows), sent, upTo);
      send(bytes.subarray(sent === 0 ? 0 : HEADER_BYTES, last ? bytes.byteLength : bytes.byteLength - TRAILER_BYTES));
      sent = Math.max(sent, upTo);
    };
    const rows = compute((r, upTo) => flush(r, false, upTo));
    timer?.lap(computeLap);
    flush(rows, true);
    done = rows;
  });
  timer?.lap("results-insert");
  const rows = done as ResultColumns | null;
  if (!rows) throw new Error("results: the COPY ended before its rows were computed");
  if (n !== rows.length) throw new Error(`results: COPY stored ${n} rows of ${rows.length}`);
  return rows;
}
