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
export async function copyResultRows(tx: Sql, rows: ResultColumns, timer?: PhaseTimer, encoded?: EncodedResultRows): Promise<void> {
  const chunks = encoded ?? encodeResultRows(rows);
  if (!encoded) timer?.lap("results-encode");
  for (const c of chunks) {
    const n = await tx.copyFrom(`COPY "ElementResult" (${RESULT_COLUMNS}) FROM STDIN (FORMAT binary)`, c.data);
    if (n !== c.rows) throw new Error(`results: COPY stored ${n} rows of ${c.rows}`);
    timer?.lap("results-insert");
  }
}

/** A COPY stream per statement of up to RESULT_CHUNK rows. */
export type EncodedResultRows = { data: Uint8Array; rows: number }[];

/** The binary COPY streams of the rows (the ingest service encodes them while the server stores the observations). */
export function encodeResultRows(rows: ResultColumns): EncodedResultRows {
  const columns: CopyColumn[] = [
    { type: "int4", values: rows.elementId },
    { type: "int4", values: rows.epochId },
    { type: "int4", values: rows.referenceEpochId },
    { type: "timestamptz", values: rows.timeIso },
    { type: "text", values: rows.status },
    ...STORED_VALUE_KEYS.map((k): CopyColumn => ({ type: "float8", values: rows.values[k] })),
  ];
  const out: EncodedResultRows = [];
  for (let i = 0; i < rows.length; i += RESULT_CHUNK) {
    const j = Math.min(rows.length, i + RESULT_CHUNK);
    out.push({ data: writeCopyBinary(columns, i, j), rows: j - i });
  }
  return out;
}
