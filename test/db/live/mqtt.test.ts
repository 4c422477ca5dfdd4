/**
 * The MQTT live feed against the machine's mosquitto (127.0.0.1:1883): a message goes through the
 * same ingest service as POST /epochs (stored, idempotent, rejected with the same field errors,
 * pipeline hook fired) and is answered on the reply topic. Skips when no broker answers.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { getDb } from "../../../lib/server/db/client.ts";
import { onEpochsCommitted } from "../../../lib/server/pipeline.ts";
import { liveFeedState } from "../../../lib/server/live/state.ts";
import { counts, makeSite, post, type TestSite } from "../ingest/helpers.ts";
import { MACHINE_BROKER, cycleTime, epochJson, isListening, publisherFor, subscriberFor, waitFor } from "./helpers.ts";

const brokerUp = await isListening(MACHINE_BROKER.host, MACHINE_BROKER.port);
if (!brokerUp) console.warn(`[live] no MQTT broker on ${MACHINE_BROKER.host}:${MACHINE_BROKER.port}: MQTT tests skipped (start one with \`mosquitto -d\`)`);
const URL = `mqtt://${MACHINE_BROKER.host}:${MACHINE_BROKER.port}`;

describe.skipIf(!brokerUp)("MQTT live feed (machine broker)", () => {
  let site: TestSite;
  let sub: ReturnType<typeof subscriberFor>;
  let pub: Awaited<ReturnType<typeof publisherFor>>;
  const committed: { siteId: number; epochIds: number[] }[] = [];
  let offHook = (): void => undefined;

  beforeAll(async () => {
    site = await makeSite();
    offHook = onEpochsCommitted((e) => {
      if (e.siteId === site.id) committed.push(e);
    });
    sub = subscriberFor(URL, site.slug);
    await waitFor("subscriber connected", () => sub.sub.state().connection === "connected");
    pub = await publisherFor(URL, site.slug);
  });
  afterAll(async () => {
    offHook();
    await pub?.close();
    await sub?.sub.stop();
  });

  const replyFor = (ref: string) => waitFor(`reply for ${ref}`, () => pub.replies.find((r) => r.body.ref === ref));

  it("a published epoch is stored through ingestEpochs, answered 201 on replies/{clientRef}, and fires the pipeline hook", async () => {
    const time = cycleTime(0);
    await pub.publish({ ...epochJson(time), token: site.ingestToken, clientRef: "ats-1" });
    const r = await replyFor("ats-1");
    expect(r.topic).toBe(`epochal/v1/sites/${site.slug}/replies/ats-1`);
    expect(r.body.status).toBe(201);
    const epochs = r.body.epochs as { id: number; time: string; outcome: string; observations: number }[];
    expect(epochs).toHaveLength(1);
    expect(epochs[0]).toMatchObject({ time: "2024-06-01T00:00:00.000Z", outcome: "created", observations: 4 });
    const row = await getDb().epoch.findUnique({ where: { id: epochs[0].id } });
    expect(row?.source).toBe("mqtt");
    expect(row?.siteId).toBe(site.id);
    await waitFor("pipeline hook", () => committed.some((c) => c.epochIds.includes(epochs[0].id)));
  });

  it("the same message published twice is stored once and the repeat is answered 200 unchanged", async () => {
    const time = cycleTime(1);
    const before = await counts(site.id);
    const body = { ...epochJson(time, 0.002), token: site.ingestToken };
    await pub.publish({ ...body, clientRef: "dup-a" });
    await pub.publish({ ...body, clientRef: "dup-b" });
    const a = await replyFor("dup-a");
    const b = await replyFor("dup-b");
    expect(a.body.status).toBe(201);
    expect(b.body.status).toBe(200);
    expect((b.body.epochs as { outcome: string }[])[0].outcome).toBe("unchanged");
    expect((b.body.epochs as { id: number }[])[0].id).toBe((a.body.epochs as { id: number }[])[0].id);
    const after = await counts(site.id);
    expect(after.epochs - before.epochs).toBe(1);
    expect(after.observations - before.observations).toBe(4);
  });

  it("a malformed message is answered 422 with the same field errors as POST /epochs, stores nothing, and leaves an mqtt.rejected audit row", async () => {
    const bad = { time: cycleTime(2), observations: [{ point: "L1", east: "1000,5", north: 2000, height: 100 }, { point: "L2", east: 1, north: 2, height: 3, sigma_est: 0.001 }] };
    const before = await counts(site.id);
    await pub.publish({ ...bad, token: site.ingestToken, clientRef: "bad-1" });
    const r = await replyFor("bad-1");
    expect(r.body.status).toBe(422);
    const errors = r.body.errors as { line: number | null; field: string | null; message: string }[];
    expect(errors.map((e) => e.field)).toEqual(expect.arrayContaining(["observations[0].east"]));
    // Identical to the HTTP API's answer for the same body.
    const http = await post(site.slug, JSON.stringify(bad), { token: site.ingestToken, type: "application/json" });
    expect(http.status).toBe(422);
    expect(errors).toEqual(http.json.errors);
    const after = await counts(site.id);
    expect({ epochs: after.epochs, observations: after.observations, points: after.points }).toEqual({ epochs: before.epochs, observations: before.observations, points: before.points });
    const audit = await waitFor("audit row", () => getDb().auditEntry.findFirst({ where: { siteId: site.id, action: "mqtt.rejected", entityId: "bad-1" } }));
    expect(audit.actor).toMatch(/^token:/);
    const after_ = audit.after as { status: number; errors: { field: string }[]; topic: string };
    expect(after_.status).toBe(422);
    expect(after_.errors.map((e) => e.field)).toContain("observations[0].east");
    expect(JSON.stringify(audit.after)).not.toContain(site.ingestToken);
  });

  it("a message without a token, with a read token, or with an unknown token is answered 401/403 and stores nothing", async () => {
    const before = await counts(site.id);
    await pub.publish({ ...epochJson(cycleTime(3)), clientRef: "auth-none" });
    await pub.publish({ ...epochJson(cycleTime(3)), token: site.readToken, clientRef: "auth-read" });
    await pub.publish({ ...epochJson(cycleTime(3)), token: "ept_not-a-token", clientRef: "auth-unknown" });
    expect((await replyFor("auth-none")).body.status).toBe(401);
    expect((await replyFor("auth-read")).body.status).toBe(403);
    expect((await replyFor("auth-unknown")).body.status).toBe(401);
    expect((await counts(site.id)).epochs).toBe(before.epochs);
    const rows = await getDb().auditEntry.findMany({ where: { action: "mqtt.rejected", entityId: { in: ["auth-none", "auth-read", "auth-unknown"] } } });
    expect(rows).toHaveLength(3);
  });

  it("another site's ingest token is refused with 403", async () => {
    const other = await makeSite();
    await pub.publish({ ...epochJson(cycleTime(4)), token: other.ingestToken, clientRef: "other-site" });
    expect((await replyFor("other-site")).body.status).toBe(403);
  });

  it("MQTT 5 properties carry the envelope: authorization user property, text/csv content type, response topic and correlation data", async () => {
    const csv = ["point,east,north,height,time", ...["L1,1000.004,2000,100", "L2,1010,2000,100.5", "L3,1005,2008.66,101"].map((l) => `${l},${cycleTime(5)}`)].join("\n") + "\n";
    const responseTopic = `epochal/v1/sites/${site.slug}/replies/props/x`;
    await pub.publish(csv, { properties: { contentType: "text/csv", responseTopic, correlationData: Buffer.from("corr-7"), userProperties: { authorization: `Bearer ${site.ingestToken}` } } });
    const r = await waitFor("csv reply", () => pub.replies.find((x) => x.topic === responseTopic));
    expect(r.body.status).toBe(201);
    expect(r.correlationData?.toString()).toBe("corr-7");
    expect((r.body.epochs as { observations: number }[])[0].observations).toBe(3);
  });

  it("a reply address outside the site's replies/ prefix is ignored, and the message is still stored", async () => {
    const before = await counts(site.id);
    await pub.publish({ ...epochJson(cycleTime(6)), token: site.ingestToken, replyTo: "somewhere/else" });
    await waitFor("stored", async () => (await counts(site.id)).epochs === before.epochs + 1);
  });

  it("liveFeedState reports off when no subscriber was started in this process by startLiveFeed", () => {
    expect(liveFeedState().connection).toBe("off");
    expect(sub.sub.state()).toMatchObject({ connection: "connected", clientId: sub.clientId });
    expect(sub.sub.state().stored).toBeGreaterThan(0);
    expect(sub.sub.state().rejected).toBeGreaterThan(0);
  });
});

describe.skipIf(!brokerUp)("publishFiles (epochal push --mqtt)", () => {
  it("publishFiles sends CSV and JSON files, reports stored, unchanged and refused files with file and field, and returns the exit status", async () => {
    const { mkdtempSync, writeFileSync } = await import("node:fs");
    const { join } = await import("node:path");
    const { tmpdir } = await import("node:os");
    const { publishFiles, describeProgress } = await import("../../../lib/server/live/publish.ts");
    const site = await makeSite();
    const s = subscriberFor(URL, site.slug);
    try {
      await waitFor("connected", () => s.sub.state().connection === "connected");
      const dir = mkdtempSync(join(tmpdir(), "epochal-push-mqtt-"));
      const csv = join(dir, "cycle.csv");
      writeFileSync(csv, ["point,east,north,height,time", `L1,1000,2000,100,${cycleTime(0)}`, `L2,1010,2000,100.5,${cycleTime(0)}`, `L3,1005,2008.66,101,${cycleTime(0)}`].join("\n") + "\n");
      const json = join(dir, "cycle.json");
      writeFileSync(json, JSON.stringify(epochJson(cycleTime(1))));
      const bad = join(dir, "bad.csv");
      writeFileSync(bad, "point,east,north,height,time\nL1,abc,2000,100,2024-06-01T00:00:00Z\n");
      const lines: string[] = [];
      const status = await publishFiles({ mqttUrl: URL, site: site.slug, token: site.ingestToken, files: [csv, json, csv, bad], replyTimeoutS: 20, onProgress: (p) => lines.push(...(describeProgress(p)?.lines ?? [])) });
      expect(status).toBe(2);
      expect(lines[0]).toMatch(/cycle\.csv: 1 stored/);
      expect(lines[1]).toMatch(/cycle\.json: 1 stored/);
      expect(lines[2]).toMatch(/cycle\.csv: 0 stored, 0 revised, 1 already stored/);
      expect(lines[3]).toMatch(/bad\.csv: refused \(status 422\)/);
      expect(lines[4]).toMatch(/bad\.csv:2 east: /);
      expect((await counts(site.id)).epochs).toBe(2);
    } finally {
      await s.sub.stop();
    }
  });
});
