/**
 * GET /api/v1/sites/{slug}/events in-process: access, the `ready` event, an `epoch` event after a
 * commit (HTTP and MQTT), heartbeats, closing; and the delay from an MQTT publish to the SSE event
 * (printed).
 */
import { describe, expect, it } from "vitest";
import { GET as getEvents } from "../../../app/api/v1/sites/[slug]/events/route.ts";
import { openEventStreams, siteEventStream } from "../../../lib/server/live/events.ts";
import { epochCsv, GRID, makeSite, post } from "../ingest/helpers.ts";
import { MACHINE_BROKER, cycleTime, epochJson, isListening, publisherFor, subscriberFor, waitFor } from "./helpers.ts";

function eventsRequest(slug: string, token: string | null, query = "", signal?: AbortSignal): Promise<Response> {
  const headers: Record<string, string> = token ? { authorization: `Bearer ${token}` } : {};
  return getEvents(new Request(`http://localhost/api/v1/sites/${slug}/events${query}`, { headers, signal }), { params: Promise.resolve({ slug }) });
}

/** Reads the stream until `until(text)` holds; returns everything read so far. */
async function readUntil(reader: ReadableStreamDefaultReader<Uint8Array>, sofar: { text: string }, until: (t: string) => boolean, timeoutMs = 20_000): Promise<string> {
  const dec = new TextDecoder();
  const deadline = Date.now() + timeoutMs;
  while (!until(sofar.text)) {
    const left = deadline - Date.now();
    if (left <= 0) throw new Error(`stream did not deliver in time; got: ${sofar.text.slice(-500)}`);
    const r = await Promise.race([reader.read(), new Promise<"timeout">((res) => setTimeout(() => res("timeout"), left))]);
    if (r === "timeout") continue;
    if (r.done) throw new Error(`stream ended; got: ${sofar.text.slice(-500)}`);
    sofar.text += dec.decode(r.value, { stream: true });
  }
  return sofar.text;
}

function epochEvents(text: string): { epochIds: number[]; time: string | null }[] {
  return [...text.matchAll(/event: epoch\ndata: (.*)\n\n/g)].map((m) => JSON.parse(m[1]) as { epochIds: number[]; time: string | null });
}

describe("GET /api/v1/sites/{slug}/events", () => {
  it("answers 401 without credentials and 403 with another site's token", async () => {
    const s = await makeSite();
    const other = await makeSite();
    expect((await eventsRequest(s.slug, null)).status).toBe(401);
    expect((await eventsRequest(s.slug, other.readToken)).status).toBe(403);
  });

  it("streams text/event-stream: `ready` first, then an `epoch` event with the ids and time of epochs posted over HTTP, and stops when the client aborts", async () => {
    const s = await makeSite();
    const ac = new AbortController();
    const res = await eventsRequest(s.slug, s.readToken, "", ac.signal);
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^text\/event-stream/);
    const reader = (res.body as ReadableStream<Uint8Array>).getReader();
    const buf = { text: "" };
    await readUntil(reader, buf, (t) => t.includes("event: ready"));
    expect(buf.text).toContain(`data: {"site":"${s.slug}"}`);
    expect(buf.text).toMatch(/^retry: \d+\n/);
    const open = openEventStreams();
    const posted = await post(s.slug, epochCsv("2024-08-01T06:00:00Z", GRID), { token: s.ingestToken });
    expect(posted.status).toBe(201);
    const id = (posted.json.epochs as { id: number }[])[0].id;
    await readUntil(reader, buf, (t) => epochEvents(t).length > 0);
    expect(epochEvents(buf.text)[0]).toEqual({ epochIds: [id], time: "2024-08-01T06:00:00.000Z" });
    ac.abort();
    await waitFor("stream unsubscribed", () => openEventStreams() === open - 1, 5000);
  });

  it("a repeated POST of the same epoch (nothing committed) sends no epoch event", async () => {
    const s = await makeSite();
    const body = epochCsv("2024-08-01T07:00:00Z", GRID);
    await post(s.slug, body, { token: s.ingestToken });
    const res = await eventsRequest(s.slug, s.readToken, "?maxS=2");
    const again = await post(s.slug, body, { token: s.ingestToken });
    expect(again.status).toBe(200);
    const text = await res.text(); // closes after maxS
    expect(text).toContain("event: ready");
    expect(epochEvents(text)).toEqual([]);
  });

  it("?maxS=0 sends `ready` and closes; a bad maxS is answered 422", async () => {
    const s = await makeSite();
    const text = await (await eventsRequest(s.slug, s.readToken, "?maxS=0")).text();
    expect(text).toContain("event: ready");
    expect((await eventsRequest(s.slug, s.readToken, "?maxS=-1")).status).toBe(422);
  });

  it("siteEventStream sends a heartbeat comment at the heartbeat interval", async () => {
    const s = await makeSite();
    const reader = siteEventStream({ siteId: s.id, slug: s.slug, heartbeatMs: 40, maxS: 5 }).getReader();
    const buf = { text: "" };
    await readUntil(reader, buf, (t) => (t.match(/^: heartbeat /gm) ?? []).length >= 2, 5000);
    await reader.cancel();
  });
});

const brokerUp = await isListening(MACHINE_BROKER.host, MACHINE_BROKER.port);
describe.skipIf(!brokerUp)("MQTT publish → SSE event (machine broker)", () => {
  it("an epoch published over MQTT reaches an open event stream; the delay is printed", async () => {
    const s = await makeSite();
    const url = `mqtt://${MACHINE_BROKER.host}:${MACHINE_BROKER.port}`;
    const { sub } = subscriberFor(url, s.slug);
    const pub = await publisherFor(url, s.slug);
    const ac = new AbortController();
    try {
      await waitFor("connected", () => sub.state().connection === "connected");
      const res = await eventsRequest(s.slug, s.readToken, "", ac.signal);
      const reader = (res.body as ReadableStream<Uint8Array>).getReader();
      const buf = { text: "" };
      await readUntil(reader, buf, (t) => t.includes("event: ready"));
      const delays: number[] = [];
      for (let k = 0; k < 5; k++) {
        const t0 = performance.now();
        await pub.publish({ ...epochJson(cycleTime(k), k * 0.001), token: s.ingestToken });
        await readUntil(reader, buf, (t) => epochEvents(t).length > k);
        delays.push(performance.now() - t0);
      }
      expect(epochEvents(buf.text).map((e) => e.time)).toEqual([0, 1, 2, 3, 4].map((k) => new Date(cycleTime(k)).toISOString()));
      const sorted = [...delays].sort((a, b) => a - b);
      console.log(`[live] MQTT publish → SSE epoch event: ${delays.map((d) => d.toFixed(0)).join(", ")} ms (median ${sorted[2].toFixed(0)} ms; includes ingest and element results)`);
    } finally {
      ac.abort();
      await pub.close();
      await sub.stop();
    }
  });
});
