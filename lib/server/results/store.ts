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
  const columns: CopyColumn[] = [
    { type: "int4", values: rows.elementId },
    { type: "int4", values: rows.epochId },
    { type: "int4", values: rows.referenceEpochId },
    { type: "timestamptz", values: rows.timeIso },
    { type: "text", values: rows.status },
    ...STORED_VALUE_KEYS.map((k): CopyColumn => ({ type: "float8", values: rows.values[k] })),
  ];
  for (let i = 0; i < rows.length; i += RESULT_CHUNK) {
    const j = Math.min(rows.length, i + RESULT_CHUNK);
    const data = writeCopyBinary(columns, i, j);
    timer?.lap("results-encode");
    const n = await tx.copyFrom(`COPY "ElementResult" (${RESULT_COLUMNS}) FROM STDIN (FORMAT binary)`, data);
    if (n !== j - i) throw new Error(`results: COPY stored ${n} rows of ${j - i}`);
    timer?.lap("results-insert");
  }
}
