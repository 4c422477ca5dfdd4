/**
 * Helpers of the live-feed tests: is a broker there, a private mosquitto on a free port (started,
 * killed and restarted by the test), a publisher that waits for replies, polling.
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { mkdtempSync, writeFileSync, rmSync } from "node:fs";
import { createServer, connect as tcpConnect } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import mqtt, { type MqttClient } from "mqtt";
import { startMqttSubscriber, type LiveSubscriber, type SubscriberOptions } from "../../../lib/server/live/mqtt.ts";
import type { HandleOutcome } from "../../../lib/server/live/handle.ts";
import { epochsTopic, repliesPrefix } from "../../../lib/server/live/topics.ts";
import { uniqueSlug } from "../../support/unique.ts";

export const MACHINE_BROKER = { host: "127.0.0.1", port: 1883 };

/** True when something accepts TCP connections there within `timeoutMs`. */
export function isListening(host: string, port: number, timeoutMs = 1000): Promise<boolean> {
  return new Promise((resolve) => {
    const s = tcpConnect({ host, port });
    const done = (ok: boolean) => {
      s.destroy();
      resolve(ok);
    };
    s.setTimeout(timeoutMs, () => done(false));
    s.once("connect", () => done(true));
    s.once("error", () => done(false));
  });
}

export const hasMosquittoBinary = spawnSync("sh", ["-c", "command -v mosquitto"]).status === 0;

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const srv = createServer();
    srv.once("error", reject);
    srv.listen(0, "127.0.0.1", () => {
      const a = srv.address();
      const port = typeof a === "object" && a ? a.port : 0;
      srv.close(() => resolve(port));
    });
  });
}

export async function waitFor<T>(what: string, probe: () => T | undefined | null | false | Promise<T | undefined | null | false>, timeoutMs = 20_000, everyMs = 25): Promise<T> {
  const until = Date.now() + timeoutMs;
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() > until) throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
    await new Promise((r) => setTimeout(r, everyMs));
  }
}

/** A private mosquitto on 127.0.0.1:port with persistence in a temporary folder; stop and start it at will. */
export class PrivateBroker {
  readonly dir = mkdtempSync(join(tmpdir(), "epochal-mosquitto-"));
  private child: ChildProcess | null = null;
  constructor(readonly port: number) {
    writeFileSync(
      join(this.dir, "mosquitto.conf"),
      [`listener ${port} 127.0.0.1`, "allow_anonymous true", "persistence true", `persistence_location ${this.dir}/`, "max_queued_messages 100000", "user root", ""].join("\n"),
    );
  }
  get url(): string {
    return `mqtt://127.0.0.1:${this.port}`;
  }
  async start(): Promise<void> {
    this.child = spawn("mosquitto", ["-c", join(this.dir, "mosquitto.conf")], { stdio: "ignore" });
    await waitFor(`mosquitto on port ${this.port}`, () => isListening("127.0.0.1", this.port, 200), 10_000, 50);
  }
  /** SIGTERM: mosquitto saves its sessions and queued messages to the persistence file. */
  async stop(): Promise<void> {
    const c = this.child;
    this.child = null;
    if (!c || c.exitCode !== null) return;
    await new Promise<void>((resolve) => {
      c.once("exit", () => resolve());
      c.kill("SIGTERM");
    });
  }
  async dispose(): Promise<void> {
    await this.stop();
    rmSync(this.dir, { recursive: true, force: true });
  }
}

export type Outcomes = HandleOutcome[];

/** A subscriber for one site's topic only (tests share the machine's broker with each other). */
export function subscriberFor(url: string, slug: string, extra: Partial<SubscriberOptions> = {}): { sub: LiveSubscriber; outcomes: Outcomes; clientId: string } {
  const outcomes: Outcomes = [];
  const clientId = extra.clientId ?? uniqueSlug("epochal-test-sub");
  const sub = startMqttSubscriber({
    url,
    clientId,
    subscription: epochsTopic(slug),
    sessionExpiryS: 300,
    reconnectInitialMs: 100,
    reconnectMaxMs: 1000,
    ...extra,
    onOutcome: (o, m) => {
      outcomes.push(o);
      extra.onOutcome?.(o, m);
    },
  });
  return { sub, outcomes, clientId };
}

export type ReplyMessage = { topic: string; body: Record<string, unknown>; correlationData?: Buffer };

/** A publisher that listens on the site's replies/# and collects what arrives. */
export async function publisherFor(url: string, slug: string, opts: { clientId?: string; clean?: boolean } = {}): Promise<{ client: MqttClient; replies: ReplyMessage[]; publish: (payload: string | Record<string, unknown>, o?: mqtt.IClientPublishOptions) => Promise<void>; close: () => Promise<void> }> {
  const client = await mqtt.connectAsync(url, {
    protocolVersion: 5,
    clientId: opts.clientId ?? uniqueSlug("epochal-test-pub"),
    clean: opts.clean ?? true,
    ...(opts.clean === false ? { properties: { sessionExpiryInterval: 300 } } : {}),
    reconnectPeriod: 100,
  });
  const replies: ReplyMessage[] = [];
  client.on("message", (topic, payload, packet) => {
    replies.push({ topic, body: JSON.parse(payload.toString("utf8")) as Record<string, unknown>, ...(packet.properties?.correlationData ? { correlationData: packet.properties.correlationData } : {}) });
  });
  await client.subscribeAsync(`${repliesPrefix(slug)}#`, { qos: 1 });
  return {
    client,
    replies,
    publish: async (payload, o = {}) => {
      await client.publishAsync(epochsTopic(slug), typeof payload === "string" ? payload : JSON.stringify(payload), { qos: 1, ...o });
    },
    close: () => client.endAsync(),
  };
}

/** One epoch as the HTTP API's JSON takes it: a 10 m triangle and a fourth point, shifted east by `shiftM`. */
export function epochJson(time: string, shiftM = 0): { time: string; observations: { point: string; east: number; north: number; height: number }[] } {
  return {
    time,
    observations: [
      { point: "L1", east: 1000 + shiftM, north: 2000, height: 100 },
      { point: "L2", east: 1010, north: 2000, height: 100.5 },
      { point: "L3", east: 1005, north: 2008.66, height: 101 },
      { point: "L4", east: 1015, north: 2008.66, height: 99.8 },
    ],
  };
}

/** ISO time `k` cycles of 15 minutes after a fixed start. */
export function cycleTime(k: number, startIso = "2024-06-01T00:00:00Z"): string {
  return new Date(Date.parse(startIso) + k * 15 * 60_000).toISOString();
}
