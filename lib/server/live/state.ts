/**
 * The live feed's connection state, readable without loading the MQTT client (the health route
 * imports this). The subscriber started by `startLiveFeed` publishes its state here; it lives on
 * globalThis so that every bundle of this module in one Next.js process sees the same value.
 */

export type LiveConnection = "off" | "connecting" | "connected" | "reconnecting" | "stopped";

export interface LiveFeedState {
  connection: LiveConnection;
  /** Broker URL without user name or password; null when off. */
  broker: string | null;
  clientId: string | null;
  /** When the current connection was made (ISO), or null. */
  connectedSince: string | null;
  lastError: string | null;
  received: number;
  stored: number;
  unchanged: number;
  rejected: number;
  /** Messages not acknowledged because of a server-side failure (the broker delivers them again). */
  failed: number;
  reconnects: number;
}

export function offState(): LiveFeedState {
  return { connection: "off", broker: null, clientId: null, connectedSince: null, lastError: null, received: 0, stored: 0, unchanged: 0, rejected: 0, failed: 0, reconnects: 0 };
}

const KEY = Symbol.for("epochal.live.state");
type Holder = { [KEY]?: () => LiveFeedState };

/** Installs the getter of the process's subscriber (or removes it with null). */
export function setLiveStateSource(getter: (() => LiveFeedState) | null): void {
  const h = globalThis as Holder;
  if (getter) h[KEY] = getter;
  else delete h[KEY];
}

/** The live feed's state in this process: `off` when no subscriber was started here. */
export function liveFeedState(): LiveFeedState {
  const g = (globalThis as Holder)[KEY];
  return g ? g() : offState();
}

/** A broker URL fit for logs and the health route: no user name, no password. */
export function redactUrl(url: string): string {
  try {
    const u = new URL(url);
    u.username = "";
    u.password = "";
    return u.toString();
  } catch {
    return "(unparseable MQTT_URL)";
  }
}

export type PublicLiveState = Pick<LiveFeedState, "connection" | "connectedSince" | "received" | "stored" | "unchanged" | "rejected" | "failed" | "reconnects">;

/** What the public health route shows: the state and counters, not the broker's address or errors. */
export function publicLiveState(): PublicLiveState {
  const { connection, connectedSince, received, stored, unchanged, rejected, failed, reconnects } = liveFeedState();
  return { connection, connectedSince, received, stored, unchanged, rejected, failed, reconnects };
}
