/**
 * One MQTT message → one ingest call, exactly as POST /api/v1/sites/{slug}/epochs would do it.
 *
 * The payload is turned into the same HTTP request the route receives (content type, body,
 * `?revise=`, `?time=`) and handed to `parseIngestRequest` and `ingestEpochs` with source "mqtt", so
 * size limit, UTF-8 check, parsers, bounds, idempotency, atomicity and the post-commit hook are the
 * HTTP API's own. The token is checked with the same rules as a bearer token (unknown or revoked:
 * 401; another site's: 403; scope without `ingest`: 403). Envelope keys of a JSON payload
 * (`token`, `clientRef`, `replyTo`, `revise`) are taken off before the epoch JSON parser sees it,
 * which refuses unknown keys. Layout of topics and payloads: ./mqtt.ts.
 */
import { getDb, type Db } from "../db/client.ts";
import { AppError, isAppError, type FieldError } from "../errors.ts";
import { recordAudit } from "../audit.ts";
import { hashSecret } from "../auth/secrets.ts";
import { assertSitePermission, type Actor } from "../http/route.ts";
import type { TokenScope } from "../auth/permissions.ts";
import { parseIngestRequest } from "../ingest/request.ts";
import { ingestEpochs } from "../ingest/service.ts";
import { parseJsonText } from "../../formats/epoch-json.ts";
import { isAllowedReplyTopic, isClientRef, replyTopic, slugOfEpochsTopic } from "./topics.ts";

/** The parts of an MQTT PUBLISH the handler reads (MQTT 5 properties optional). */
export interface LiveMessage {
  topic: string;
  payload: Uint8Array;
  properties?: {
    contentType?: string;
    responseTopic?: string;
    correlationData?: Uint8Array;
    userProperties?: Record<string, string | string[]>;
  };
}

export type ReplyBody =
  | { status: 200 | 201; ref?: string; epochs: { id: number; time: string; observations: number; revision: number; outcome: string; contentHash: string }[]; newPoints: string[] }
  | { status: number; ref?: string; error: { code: string; message: string }; errors?: FieldError[]; [detail: string]: unknown };

export interface Reply {
  topic: string;
  body: ReplyBody;
  correlationData?: Uint8Array;
}

export type HandleOutcome =
  | { kind: "stored" | "unchanged"; ack: true; reply: Reply | null; siteId: number; epochIds: number[] }
  | { kind: "rejected"; ack: true; reply: Reply | null; siteId: number | null; status: number; errors: FieldError[] }
  /** Not our input's fault (database down, a bug): not acknowledged, so the broker delivers it again. */
  | { kind: "failed"; ack: false; error: unknown };

export const ENVELOPE_KEYS = ["token", "clientRef", "replyTo", "revise"] as const;
/** At most this many field errors are copied into the audit row (the reply carries them all). */
const AUDIT_ERRORS = 20;

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === "object" && v !== null && !Array.isArray(v);
}

function userProperty(msg: LiveMessage, name: string): string | undefined {
  const props = msg.properties?.userProperties;
  if (!props) return undefined;
  for (const [k, v] of Object.entries(props)) if (k.toLowerCase() === name.toLowerCase()) return Array.isArray(v) ? v[0] : v;
  return undefined;
}

interface Envelope {
  contentType: string;
  body: Uint8Array | string;
  token: string | null;
  clientRef: string | null;
  replyTo: string | null;
  revise: string | null;
  time: string | null;
  errors: FieldError[];
}

/** Splits the message into the HTTP body and the envelope (token, reply address, flags). */
function readEnvelope(msg: LiveMessage): Envelope {
  const contentType = (msg.properties?.contentType ?? "").split(";")[0].trim().toLowerCase() || "application/json";
  const env: Envelope = { contentType, body: msg.payload, token: null, clientRef: null, replyTo: null, revise: null, time: null, errors: [] };
  if (contentType === "application/json") {
    let text: string | null = null;
    try {
      text = new TextDecoder("utf-8", { fatal: true }).decode(msg.payload);
    } catch {
      /* the ingest request reports invalid UTF-8 in its own words */
    }
    const parsed = text === null ? null : parseJsonText(text);
    if (parsed?.ok && isObject(parsed.value)) {
      const rest: Record<string, unknown> = { ...parsed.value };
      const take = (key: (typeof ENVELOPE_KEYS)[number]): unknown => {
        const v = rest[key];
        delete rest[key];
        return v;
      };
      const token = take("token"), clientRef = take("clientRef"), replyTo = take("replyTo"), revise = take("revise");
      if (token !== undefined) typeof token === "string" ? (env.token = token) : env.errors.push({ line: null, field: "token", message: "must be a string (the site's ingest token)" });
      if (clientRef !== undefined) typeof clientRef === "string" && isClientRef(clientRef) ? (env.clientRef = clientRef) : env.errors.push({ line: null, field: "clientRef", message: "must be 1–100 characters A–Z a–z 0–9 . _ - (one topic level)" });
      if (replyTo !== undefined) typeof replyTo === "string" ? (env.replyTo = replyTo) : env.errors.push({ line: null, field: "replyTo", message: "must be a topic name (string)" });
      if (revise !== undefined) typeof revise === "boolean" ? (env.revise = String(revise)) : env.errors.push({ line: null, field: "revise", message: `must be true or false` });
      env.body = JSON.stringify(rest);
    }
  }
  const auth = userProperty(msg, "authorization");
  if (env.token === null && auth !== undefined) env.token = auth.replace(/^Bearer\s+/i, "").trim();
  env.clientRef ??= (() => {
    const r = userProperty(msg, "clientRef");
    return r !== undefined && isClientRef(r) ? r : null;
  })();
  env.revise ??= userProperty(msg, "revise") ?? null;
  env.time = userProperty(msg, "time") ?? null;
  return env;
}

/** Where the answer goes: the MQTT 5 response topic, else `replyTo`, else the site's replies/{clientRef}. */
function replyAddress(slug: string, msg: LiveMessage, env: Envelope): string | null {
  const wanted = msg.properties?.responseTopic ?? env.replyTo ?? (env.clientRef ? replyTopic(slug, env.clientRef) : null);
  return wanted !== null && isAllowedReplyTopic(slug, wanted) ? wanted : null;
}

type TokenActor = Extract<Actor, { kind: "token" }>;

/** The token's Actor, with the bearer-token rules of lib/server/http/route.ts. */
async function tokenActor(secret: string | null, db: Db): Promise<TokenActor> {
  if (!secret) throw new AppError("unauthenticated", "Send the site's ingest token in the payload's `token` field or in the MQTT 5 user property `authorization`.");
  const t = await db.apiToken.findUnique({ where: { tokenHash: hashSecret(secret) } });
  if (!t || t.revokedAt) throw new AppError("unauthenticated", "Unknown or revoked API token.");
  if (!t.lastUsedAt || Date.now() - t.lastUsedAt.getTime() > 60_000) await db.apiToken.update({ where: { id: t.id }, data: { lastUsedAt: new Date() } }).catch(() => undefined);
  return { kind: "token", tokenId: t.id, siteId: t.siteId, scope: t.scope as TokenScope, label: `token:${t.prefix}` };
}

function errorBody(err: AppError, ref: string | null): ReplyBody {
  const body: ReplyBody = { status: err.status, ...(ref ? { ref } : {}), error: { code: err.code, message: err.message } };
  if (err.errors) body.errors = err.errors;
  if (err.details) for (const [k, v] of Object.entries(err.details)) if (!(k in body)) body[k] = v;
  return body;
}

/** Handles one message; never throws (a failure is the `failed` outcome). */
export async function handleLiveMessage(msg: LiveMessage, db: Db = getDb()): Promise<HandleOutcome> {
  const slug = slugOfEpochsTopic(msg.topic);
  let env: Envelope | null = null;
  let reply: string | null = null;
  let actor: TokenActor | null = null;
  let siteId: number | null = null;
  const ref = (): string | null => env?.clientRef ?? null;
  const answer = (body: ReplyBody): Reply | null => (reply === null ? null : { topic: reply, body, ...(msg.properties?.correlationData ? { correlationData: msg.properties.correlationData } : {}) });
  try {
    if (slug === null) throw new AppError("not_found", `Not an epochs topic: ${JSON.stringify(msg.topic.slice(0, 200))}; publish to epochal/v1/sites/{slug}/epochs.`);
    env = readEnvelope(msg);
    reply = replyAddress(slug, msg, env);
    actor = await tokenActor(env.token, db);
    const site = await db.site.findUnique({ where: { slug }, select: { id: true } });
    // As over HTTP: an unknown site and another site's token look the same (403, never a hint).
    if (!site) throw new AppError("forbidden", "This token belongs to another site.");
    await assertSitePermission(actor, site, "ingest");
    siteId = site.id;
    if (env.errors.length > 0) throw new AppError("invalid", "The message envelope has errors; nothing was stored.", { errors: env.errors });
    const query = new URLSearchParams();
    if (env.revise !== null) query.set("revise", env.revise);
    if (env.time !== null) query.set("time", env.time);
    const req = new Request(`http://mqtt.invalid/api/v1/sites/${encodeURIComponent(slug)}/epochs${query.size ? `?${query}` : ""}`, {
      method: "POST",
      headers: { "content-type": env.contentType },
      body: typeof env.body === "string" ? env.body : new Uint8Array(env.body),
    });
    const parsed = await parseIngestRequest(req, site.id);
    const r = await ingestEpochs(parsed.epochs, { siteId: site.id, actor: actor.label, revise: parsed.revise, source: "mqtt" }, db);
    const body: ReplyBody = {
      status: r.stored ? 201 : 200,
      ...(ref() ? { ref: ref() as string } : {}),
      epochs: r.epochs.map((e) => ({ id: e.id, time: e.time, observations: e.observations, revision: e.revision, outcome: e.outcome, contentHash: e.contentHash })),
      newPoints: r.newPoints,
    };
    return { kind: r.stored ? "stored" : "unchanged", ack: true, reply: answer(body), siteId: site.id, epochIds: r.epochs.map((e) => e.id) };
  } catch (err) {
    if (!isAppError(err)) return { kind: "failed", ack: false, error: err };
    const errors = err.errors ?? [];
    try {
      await recordAudit(db, {
        actor: actor?.label ?? "mqtt:anonymous",
        siteId,
        action: "mqtt.rejected",
        entityType: "mqtt-message",
        entityId: ref(),
        after: {
          topic: msg.topic.slice(0, 300),
          status: err.status,
          code: err.code,
          message: err.message,
          errors: errors.slice(0, AUDIT_ERRORS),
          errorCount: errors.length,
          bytes: msg.payload.byteLength,
          contentType: env?.contentType ?? null,
          replyTopic: reply,
        },
      });
    } catch (auditErr) {
      // The answer still goes out; the database being down is the `failed` path's business next time.
      console.error("epochal: could not record an mqtt.rejected audit row", auditErr);
    }
    return { kind: "rejected", ack: true, reply: answer(errorBody(err, ref())), siteId, status: err.status, errors };
  }
}
