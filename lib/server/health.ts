/** Health: is the database reachable, how many migrations are applied, which optional features are on. */
import { getDb } from "./db/client.ts";
import { publicLiveState, type PublicLiveState } from "./live/state.ts";

export type Health = {
  status: "ok" | "degraded";
  database: { state: "up" | "down"; appliedMigrations: number | null; error?: string };
  features: { mqtt: "on" | "off"; mail: "smtp" | "outbox" };
  /** The MQTT live feed's connection in this process (lib/server/live/state.ts); `off` without MQTT_URL. */
  live: PublicLiveState;
  time: string;
};

export async function checkHealth(): Promise<Health> {
  const features = { mqtt: process.env.MQTT_URL ? ("on" as const) : ("off" as const), mail: process.env.SMTP_URL ? ("smtp" as const) : ("outbox" as const) };
  try {
    const db = getDb();
    const rows = await db.$queryRawUnsafe<{ n: bigint }[]>(
      `select count(*)::bigint as n from "_prisma_migrations" where finished_at is not null and rolled_back_at is null`,
    );
    return { status: "ok", database: { state: "up", appliedMigrations: Number(rows[0]?.n ?? 0) }, features, live: publicLiveState(), time: new Date().toISOString() };
  } catch (err) {
    return {
      status: "degraded",
      database: { state: "down", appliedMigrations: null, error: (err as Error).message.split("\n")[0] },
      features,
      live: publicLiveState(),
      time: new Date().toISOString(),
    };
  }
}
