/** Writing an epoch's observations in the ingest transaction. */
import { CopyBinaryWriter } from "../../formats/pg-copy-binary.ts";
import type { PhaseTimer } from "../timing.ts";
import type { ResolvedObservation } from "./content-hash.ts";
import type { Sql } from "./pg-tx.ts";

/** Observations per COPY statement (about 18 MB of binary data at the most). */
const OBSERVATION_CHUNK = 200_000;

/**
 * Observations go in with binary COPY (as the result rows do: cheaper for the server than INSERT …
 * SELECT FROM unnest), the stream written in one pass (every field is present: 2 int4 and 6 float8).
 * `whileStoring`: called once, when the first statement's data has been handed to the server (Node
 * work that overlaps the server's: hashing the epochs, computing their results); what it throws is
 * thrown from here.
 */
export async function insertObservations(tx: Sql, epochs: { epochId: number; obs: ResolvedObservation[] }[], pointId: Map<string, number>, timer?: PhaseTimer, whileStoring?: () => void): Promise<void> {
  // Run from the connection's callbacks: what it throws is kept and thrown here once the COPY has answered.
  let failure: { error: unknown } | null = null;
  let pending = whileStoring && (() => {
    try {
      whileStoring();
    } catch (error) {
      failure = { error };
    }
  });
  const sql = `COPY "Observation" ("epochId", "pointId", east, north, height, "sigmaEast", "sigmaNorth", "sigmaHeight") FROM STDIN (FORMAT binary)`;
  let at = 0;
  while (at < epochs.length) {
    // Whole epochs per statement, up to OBSERVATION_CHUNK rows (at least one epoch).
    let end = at, rows = 0;
    while (end < epochs.length && (end === at || rows + epochs[end].obs.length <= OBSERVATION_CHUNK)) rows += epochs[end++].obs.length;
    const w = new CopyBinaryWriter(rows * (2 + 2 * 8 + 6 * 12));
    for (let k = at; k < end; k++) {
      const ep = epochs[k];
      for (const o of ep.obs) {
        const p = pointId.get(o.point);
        if (p === undefined) throw new Error(`ingest: point ${o.point} has no id`);
        w.tuple(8);
        w.int4(ep.epochId);
        w.int4(p);
        w.float8(o.east);
        w.float8(o.north);
        w.float8(o.height);
        w.float8(o.sigmaEast);
        w.float8(o.sigmaNorth);
        w.float8(o.sigmaHeight);
      }
    }
    const data = w.finish();
    timer?.lap("observations-encode");
    const onSent = pending;
    pending = undefined;
    const stored = await tx.copyFrom(sql, data, onSent);
    if (failure) throw (failure as { error: unknown }).error;
    if (stored !== rows) throw new Error(`ingest: COPY stored ${stored} observations of ${rows}`);
    timer?.lap("observations");
    at = end;
  }
  pending?.();
  if (failure) throw (failure as { error: unknown }).error;
}
