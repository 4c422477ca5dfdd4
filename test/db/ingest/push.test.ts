import { createServer, type Server } from "node:http";
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { POST } from "../../../app/api/v1/sites/[slug]/epochs/route.ts";
import { chunkCsv, pushFiles, type PushIo } from "../../../lib/server/cli/commands/push.ts";
import { getDb } from "../../../lib/server/db/client.ts";
import { GRID, counts, makeSite } from "./helpers.ts";

// A real HTTP server in front of the route handler, so push goes through fetch and the network stack.
let server: Server;
let base = "";
let posts = 0;
beforeAll(async () => {
  server = createServer(async (req, res) => {
    const chunks: Buffer[] = [];
    for await (const c of req) chunks.push(c as Buffer);
    const m = /^\/api\/v1\/sites\/([^/]+)\/epochs/.exec(req.url ?? "");
    if (!m || req.method !== "POST") {
      res.writeHead(404).end();
      return;
    }
    posts++;
    const headers = new Headers();
    for (const [k, v] of Object.entries(req.headers)) if (typeof v === "string") headers.set(k, v);
    const r = await POST(new Request(`http://localhost${req.url}`, { method: "POST", headers, body: Buffer.concat(chunks) }), { params: Promise.resolve({ slug: decodeURIComponent(m[1]) }) });
    res.writeHead(r.status, { "content-type": "application/json" }).end(Buffer.from(await r.arrayBuffer()));
  });
  await new Promise<void>((ok) => server.listen(0, "127.0.0.1", ok));
  const a = server.address();
  base = `http://127.0.0.1:${typeof a === "object" && a ? a.port : 0}`;
});
afterAll(async () => {
  await new Promise((ok) => server.close(ok));
});

function capture(): PushIo & { outLines: string[]; errLines: string[]; bars: string[] } {
  const outLines: string[] = [];
  const errLines: string[] = [];
  const bars: string[] = [];
  return { outLines, errLines, bars, out: (l) => outLines.push(l), err: (l) => errLines.push(l), progress: (t) => bars.push(t), fetch };
}

function backfill(nEpochs: number, extra: (k: number) => string = () => ""): string {
  const lines = ["# backfill from the archive", "point,east,north,height,time"];
  for (let k = 0; k < nEpochs; k++) {
    const t = new Date(Date.UTC(2024, 0, 1, 0, 15 * k)).toISOString();
    for (const [p, e, n, h] of GRID) lines.push(`${p},${e + k * 1e-4},${n},${h},${t}`);
    const x = extra(k);
    if (x) lines.push(x);
  }
  return lines.join("\n") + "\n";
}

describe("epochal push", () => {
  it("chunkCsv splits a multi-epoch CSV into whole epochs and maps chunk lines back to file lines", () => {
    const chunks = chunkCsv(backfill(5), 8);
    expect(chunks.map((c) => c.epochs)).toEqual([2, 2, 1]);
    // Chunk 2: header (file line 2), then the rows of epochs 3 and 4 (file lines 11–18).
    expect(chunks[1].lineMap).toEqual([2, 11, 12, 13, 14, 15, 16, 17, 18]);
    expect(chunks[1].body.split("\n")[1]).toMatch(/^P1,1000.0002,/);
  });

  it("push posts a multi-epoch CSV in chunks with progress and stores every epoch once", async () => {
    const s = await makeSite();
    const dir = mkdtempSync(join(tmpdir(), "epochal-push-"));
    const file = join(dir, "year.csv");
    writeFileSync(file, backfill(12));
    const io = capture();
    const before = posts;
    const code = await pushFiles({ url: base, site: s.slug, token: s.ingestToken, files: [file], revise: false, chunkObservations: 16, quiet: false }, io);
    expect(code).toBe(0);
    expect(posts - before).toBe(3);
    expect(io.bars.some((b) => b.includes("12/12 epochs"))).toBe(true);
    expect(io.outLines[0]).toContain("12 stored, 0 revised, 0 already stored; 4 new points");
    expect(await counts(s.id)).toMatchObject({ epochs: 12, observations: 48 });
    // Again: idempotent.
    const again = capture();
    expect(await pushFiles({ url: base, site: s.slug, token: s.ingestToken, files: [file], revise: false, chunkObservations: 16, quiet: true }, again)).toBe(0);
    expect(again.outLines[0]).toContain("0 stored, 0 revised, 12 already stored");
  });

  it("push prints the server's errors as file:line field: message with the original file's lines, and exits 2", async () => {
    const s = await makeSite();
    const dir = mkdtempSync(join(tmpdir(), "epochal-push-"));
    const file = join(dir, "bad.json");
    writeFileSync(file, JSON.stringify({ time: "2024-01-01T00:00:00Z", observations: [{ point: "A", east: "x", north: 1, height: 1 }] }));
    const io = capture();
    expect(await pushFiles({ url: base, site: s.slug, token: s.ingestToken, files: [file], revise: false, chunkObservations: 100, quiet: true }, io)).toBe(2);
    expect(io.errLines[0]).toMatch(/refused \(HTTP 422\)/);
    expect(io.errLines[1]).toBe(`${file} observations[0].east: observations[0].east must be a finite number of metres, got a string "x"`);
    // A CSV conflict in the third chunk: lines are those of the file, earlier chunks stay stored.
    const csv = join(dir, "year.csv");
    writeFileSync(csv, backfill(6));
    await pushFiles({ url: base, site: s.slug, token: s.ingestToken, files: [csv], revise: false, chunkObservations: 100, quiet: true }, capture());
    const changed = backfill(6).replace("P1,1000.0005,", "P1,1000.0505,");
    writeFileSync(csv, changed);
    const io2 = capture();
    expect(await pushFiles({ url: base, site: s.slug, token: s.ingestToken, files: [csv], revise: false, chunkObservations: 8, quiet: true }, io2)).toBe(2);
    expect(io2.errLines[0]).toMatch(/HTTP 409.*the 4 epochs before were stored/);
    // Epoch 6 (k = 5) starts at file line 2 + 5·4 + 1 = 23.
    expect(io2.errLines[1]).toMatch(new RegExp(`^${csv.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}:23 time: an epoch at 2024-01-01T01:15:00.000Z`));
    expect(await getDb().epoch.count({ where: { siteId: s.id } })).toBe(6);
  });

  it("push with a read-only token exits 2 and says the request was refused", async () => {
    const s = await makeSite();
    const dir = mkdtempSync(join(tmpdir(), "epochal-push-"));
    const file = join(dir, "e.csv");
    writeFileSync(file, backfill(1));
    const io = capture();
    expect(await pushFiles({ url: base, site: s.slug, token: s.readToken, files: [file], revise: false, chunkObservations: 100, quiet: true }, io)).toBe(2);
    expect(io.errLines[0]).toMatch(/HTTP 403/);
  });
});
