/** The alert rows evaluation writes, as parameterised SQL on its transaction (lib/server/ingest/pg-tx.ts). */
import type { Alert } from "../db/generated/client.ts";
import type { TriggerLevel } from "../../triggers/rule.ts";
import type { Sql } from "../ingest/pg-tx.ts";
import { floatArray, intArray } from "../ingest/sql-arrays.ts";

/** Alerts whose only change is the latest value: one UPDATE for all of them. */
export async function writeStays(sql: Sql, stays: readonly { id: number; lastEpochId: number; value: number; sigma: number | null }[]): Promise<void> {
  await sql.query(
    `UPDATE "Alert" a SET "lastEpochId" = u.e, value = u.v, sigma = u.s
       FROM unnest($1::int[], $2::int[], $3::float8[], $4::float8[]) AS u(id, e, v, s) WHERE a.id = u.id`,
    [intArray(stays.map((x) => x.id)), intArray(stays.map((x) => x.lastEpochId)), floatArray(stays.map((x) => x.value)), floatArray(stays.map((x) => x.sigma))],
  );
}

/** Alert columns evaluation may set; the names are this whitelist, the values parameters. */
export type AlertChange = Partial<Pick<Alert, "level" | "peakLevel" | "isSignificant" | "openedAt" | "openedEpochId" | "lastEpochId" | "value" | "sigma" | "clearedAt">>;

export async function insertAlert(sql: Sql, a: Pick<Alert, "siteId" | "ruleId" | "elementId" | "level" | "peakLevel" | "openedAt" | "openedEpochId" | "lastEpochId" | "value" | "sigma" | "isSignificant">): Promise<Alert> {
  const [row] = await sql.query<Alert>(
    `INSERT INTO "Alert" ("siteId", "ruleId", "elementId", level, "peakLevel", "openedAt", "openedEpochId", "lastEpochId", value, sigma, "isSignificant")
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11) RETURNING *`,
    [a.siteId, a.ruleId, a.elementId, a.level, a.peakLevel, a.openedAt, a.openedEpochId, a.lastEpochId, a.value, a.sigma, a.isSignificant],
  );
  return row;
}

export async function updateAlert(sql: Sql, id: number, change: AlertChange): Promise<Alert> {
  const keys = Object.keys(change) as (keyof AlertChange)[];
  const set = keys.map((k, i) => `"${k}" = $${i + 2}`).join(", ");
  const [row] = await sql.query<Alert>(`UPDATE "Alert" SET ${set} WHERE id = $1 RETURNING *`, [id, ...keys.map((k) => change[k])]);
  return row;
}

export async function insertEvent(sql: Sql, e: { alertId: number; at: Date; kind: string; level: TriggerLevel; value: number; comment: string | null }): Promise<bigint> {
  const [row] = await sql.query<{ id: string }>(
    `INSERT INTO "AlertEvent" ("alertId", at, kind, level, value, actor, comment) VALUES ($1, $2, $3, $4, $5, 'system', $6) RETURNING id::text AS id`,
    [e.alertId, e.at, e.kind, e.level, e.value, e.comment],
  );
  return BigInt(row.id);
}

