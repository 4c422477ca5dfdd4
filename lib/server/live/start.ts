/**
 * Starts what the server process runs beside its routes, once per process (instrumentation.ts calls
 * it when the Next.js server boots):
 *   - alerting on the ingest pipeline and the mail worker (lib/server/alerts/register.ts; idempotent,
 *     so a route that also registers it does not register it twice);
 *   - the dashboard's live events (lib/server/live/events.ts);
 *   - the MQTT subscriber when MQTT_URL is set (lib/server/live/mqtt.ts documents topics and payloads).
 */
import { hostname } from "node:os";
import { registerAlerting } from "../alerts/register.ts";
import { registerLiveEvents } from "./events.ts";
import { liveEnvSchema } from "./schemas.ts";
import { setLiveStateSource } from "./state.ts";

const KEY = Symbol.for("epochal.live.started");
type Holder = { [KEY]?: { stop: () => Promise<void> } };

/** The fixed client id of this server at the broker (its persistent session is kept under it). */
export function serverClientId(env: Record<string, string | undefined> = process.env): string {
  const name = (env.EPOCHAL_INSTANCE?.trim() || hostname()).replace(/[^A-Za-z0-9._-]/g, "-").slice(0, 60);
  return `epochal-server-${name}`;
}

export async function startLiveFeed(env: Record<string, string | undefined> = process.env): Promise<void> {
  const h = globalThis as Holder;
  if (h[KEY]) return;
  h[KEY] = { stop: async () => undefined };
  registerAlerting();
  registerLiveEvents();
  const parsed = liveEnvSchema.safeParse(env);
  if (!parsed.success) {
    console.error(`epochal: live feed not started, bad environment: ${parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
    return;
  }
  const e = parsed.data;
  if (!e.MQTT_URL) {
    console.log("epochal: live feed over MQTT is off (set MQTT_URL to turn it on)");
    return;
  }
  const { startMqttSubscriber } = await import("./mqtt.ts");
  const sub = startMqttSubscriber({ url: e.MQTT_URL, clientId: serverClientId(env), sessionExpiryS: e.MQTT_SESSION_EXPIRY_S, receiveMaximum: e.MQTT_RECEIVE_MAXIMUM });
  setLiveStateSource(sub.state);
  h[KEY] = { stop: sub.stop };
  console.log(`epochal: live feed subscribing at ${sub.state().broker} as ${sub.state().clientId}`);
}

/** Stops the subscriber started by startLiveFeed (tests, shutdown). */
export async function stopLiveFeed(): Promise<void> {
  const h = globalThis as Holder;
  const cur = h[KEY];
  if (!cur) return;
  await cur.stop();
}
