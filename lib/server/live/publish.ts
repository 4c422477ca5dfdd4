/**
 * Publishes epoch files to the live feed as a field logger would (for trying it by hand):
 *   epochal push --mqtt mqtt://broker:1883 --site SLUG --token TOKEN FILE...
 * Each file is one MQTT 5 message on epochal/v1/sites/{slug}/epochs (QoS 1), its format in the
 * content type (.csv text/csv, .json application/json, .geojson application/geo+json), the token in
 * the user property `authorization`, and a response topic under the site's replies/ prefix; the
 * server's reply is awaited and printed like `epochal push` over HTTP does.
 */
import { readFile } from "node:fs/promises";
import { extname } from "node:path";
import { randomBytes } from "node:crypto";
import mqtt from "mqtt";
import { epochsTopic, replyTopic } from "./topics.ts";

const TYPES: Record<string, string> = { ".csv": "text/csv", ".json": "application/json", ".geojson": "application/geo+json" };

type FieldError = { line: number | null; field: string | null; message: string };
type ReplyJson = { status?: number; epochs?: { outcome: string }[]; newPoints?: string[]; errors?: FieldError[]; error?: { message: string } };

export type PublishProgress =
  | { file: string; state: "published" }
  | { file: string; state: "stored" | "unchanged"; reply: ReplyJson }
  | { file: string; state: "rejected"; reply: ReplyJson }
  | { file: string; state: "no-reply"; timeoutS: number }
  | { file: string; state: "unreadable"; message: string };

export interface PublishOptions {
  mqttUrl: string;
  site: string;
  token: string;
  files: string[];
  time?: string;
  revise?: boolean;
  /** How long to wait for the server's reply to each file (default 60 s). */
  replyTimeoutS?: number;
  onProgress?: (p: PublishProgress) => void;
}

/** Publishes every file in order; returns the exit status (0 all stored, 2 a file refused, 1 broker or server unreachable). */
export async function publishFiles(o: PublishOptions): Promise<number> {
  const timeoutS = o.replyTimeoutS ?? 60;
  const ref = `push-${randomBytes(6).toString("hex")}`;
  const responseTopic = replyTopic(o.site, ref);
  const client = await mqtt.connectAsync(o.mqttUrl, { protocolVersion: 5, clean: true, clientId: `epochal-push-${randomBytes(4).toString("hex")}`, reconnectPeriod: 0, connectTimeout: 10_000 });
  const waiting = new Map<string, (r: ReplyJson) => void>();
  client.on("message", (_topic, payload, packet) => {
    const id = packet.properties?.correlationData?.toString("utf8");
    const resolve = id ? waiting.get(id) : undefined;
    if (!resolve) return;
    try {
      resolve(JSON.parse(payload.toString("utf8")) as ReplyJson);
    } catch {
      resolve({ status: 0, error: { message: "the reply is not JSON" } });
    }
  });
  let status = 0;
  try {
    await client.subscribeAsync(responseTopic, { qos: 1 });
    for (const file of o.files) {
      const contentType = TYPES[extname(file).toLowerCase()];
      if (!contentType) {
        o.onProgress?.({ file, state: "unreadable", message: "unknown file type; use .csv, .json or .geojson" });
        status = Math.max(status, 2);
        continue;
      }
      let body: Buffer;
      try {
        body = await readFile(file);
      } catch (err) {
        o.onProgress?.({ file, state: "unreadable", message: `cannot read: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}` });
        status = Math.max(status, 2);
        continue;
      }
      const id = randomBytes(8).toString("hex");
      const reply = new Promise<ReplyJson | null>((resolve) => {
        const t = setTimeout(() => {
          waiting.delete(id);
          resolve(null);
        }, timeoutS * 1000);
        waiting.set(id, (r) => {
          clearTimeout(t);
          waiting.delete(id);
          resolve(r);
        });
      });
      const userProperties: Record<string, string> = { authorization: `Bearer ${o.token}`, clientRef: ref };
      if (o.time) userProperties.time = o.time;
      if (o.revise) userProperties.revise = "true";
      await client.publishAsync(epochsTopic(o.site), body, { qos: 1, properties: { contentType, responseTopic, correlationData: Buffer.from(id), userProperties } });
      o.onProgress?.({ file, state: "published" });
      const r = await reply;
      if (r === null) {
        o.onProgress?.({ file, state: "no-reply", timeoutS });
        status = Math.max(status, 1);
        continue;
      }
      if (r.status === 200 || r.status === 201) o.onProgress?.({ file, state: r.status === 201 ? "stored" : "unchanged", reply: r });
      else {
        o.onProgress?.({ file, state: "rejected", reply: r });
        status = Math.max(status, (r.status ?? 500) >= 500 ? 1 : 2);
      }
    }
  } finally {
    await client.endAsync();
  }
  return status;
}

/** One line per event, as `epochal push` prints them. */
export function describeProgress(p: PublishProgress): { stream: "out" | "err"; lines: string[] } | null {
  switch (p.state) {
    case "published":
      return null;
    case "stored":
    case "unchanged": {
      const t = { created: 0, revised: 0, unchanged: 0 };
      for (const e of p.reply.epochs ?? []) t[e.outcome === "created" ? "created" : e.outcome === "revised" ? "revised" : "unchanged"]++;
      return { stream: "out", lines: [`${p.file}: ${t.created} stored, ${t.revised} revised, ${t.unchanged} already stored; ${p.reply.newPoints?.length ?? 0} new points (over MQTT)`] };
    }
    case "rejected":
      return {
        stream: "err",
        lines: [
          `${p.file}: refused (status ${p.reply.status ?? "?"}): ${p.reply.error?.message ?? "no message"}`,
          ...(p.reply.errors ?? []).map((e) => `${p.file}${e.line === null ? "" : `:${e.line}`}${e.field ? ` ${e.field}` : ""}: ${e.message}`),
        ],
      };
    case "no-reply":
      return { stream: "err", lines: [`${p.file}: published, but no reply within ${p.timeoutS} s (is the server subscribed? The broker keeps the message for the server's session.)`] };
    case "unreadable":
      return { stream: "err", lines: [`${p.file}: ${p.message}`] };
  }
}

export const mqttPushHelp = `  --mqtt URL           publish over MQTT instead (mqtt://broker:1883; token as user property,
                       one message per file, the server's reply awaited: --reply-timeout-s S, default 60)`;

class UsageError extends Error {}

/** `epochal push --mqtt …`: the MQTT branch of lib/server/cli/commands/push.ts. */
export async function runMqttPush(args: string[]): Promise<number> {
  const o: Partial<PublishOptions> & { files: string[] } = { files: [] };
  try {
    const need = (i: number, flag: string): string => {
      const v = args[i];
      if (v === undefined || v.startsWith("--")) throw new UsageError(`option ${flag} needs a value`);
      return v;
    };
    for (let i = 0; i < args.length; i++) {
      const a = args[i];
      if (a === "--mqtt") o.mqttUrl = need(++i, a);
      else if (a === "--site") o.site = need(++i, a);
      else if (a === "--token") o.token = need(++i, a);
      else if (a === "--time") o.time = need(++i, a);
      else if (a === "--revise") o.revise = true;
      else if (a === "--quiet") continue;
      else if (a === "--reply-timeout-s") {
        const n = Number(need(++i, a));
        if (!Number.isFinite(n) || n <= 0) throw new UsageError("--reply-timeout-s must be a positive number");
        o.replyTimeoutS = n;
      } else if (a.startsWith("--")) throw new UsageError(`option ${JSON.stringify(a)} is not available with --mqtt`);
      else o.files.push(a);
    }
    o.token ??= process.env.EPOCHAL_TOKEN;
    if (!o.site) throw new UsageError("--site is required");
    if (!o.token) throw new UsageError("--token is required (or set EPOCHAL_TOKEN)");
    if (o.files.length === 0) throw new UsageError("give at least one FILE");
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`epochal push: ${err.message}`);
      return 2;
    }
    throw err;
  }
  try {
    return await publishFiles({
      ...(o as PublishOptions),
      onProgress: (p) => {
        const d = describeProgress(p);
        if (d) for (const l of d.lines) (d.stream === "out" ? console.log : console.error)(l);
      },
    });
  } catch (err) {
    console.error(`epochal push: cannot reach the broker ${o.mqttUrl}: ${(err as Error).message}`);
    return 1;
  }
}
