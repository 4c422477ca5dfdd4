/**
 * Next.js instrumentation hook: runs once when the server process starts. In the Node.js runtime
 * it starts alerting, the mail worker, the dashboard's live events and (with MQTT_URL) the MQTT
 * subscriber — see lib/server/live/start.ts.
 */
export async function register(): Promise<void> {
  if (process.env.NEXT_RUNTIME === "nodejs") {
    const m = await import("./lib/server/live/start.ts");
    await m.startLiveFeed();
  }
}
