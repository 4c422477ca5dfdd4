/**
 * The large synthetic site of the page and memory benchmarks (test/bench/page.ts, memory.ts):
 * seeded pseudo-random points in a jittered grid over 480 m × 320 m, moving with a growing
 * settlement bowl (radial inward movement, so strain contracts near the centre and extends at the
 * rim) plus 0.7 mm noise; elements from triangulatePlan; results from the batch strain kernel,
 * inserted in bulk with unnest() — the same columns the ingest service writes — and a signed-in
 * engineer's session.
 */
import pg from "pg";
import { mulberry32 } from "../../seed/random.ts";
import { triangulatePlan } from "../../lib/network/triangulate.ts";
import { computeTriangleBatch, createTriangleBatchOut, BATCH_OK } from "../../lib/strain/batch.ts";
import { hashSecret, newSecret } from "../../lib/server/auth/secrets.ts";

const fl = (v: readonly (number | null)[]) => `{${v.map((x) => (x === null || !Number.isFinite(x) ? "NULL" : String(x))).join(",")}}`;

export type SyntheticSite = { siteId: number; slug: string; cookie: string; email: string; password: string; points: number; epochs: number; elements: number; results: number };

/** Builds the synthetic site in the database at `url`; returns its slug and a session cookie for an engineer. */
export async function buildSyntheticSite(url: string, opts: { points: number; epochs: number; log?: (m: string) => void }): Promise<SyntheticSite> {
  const log = opts.log ?? (() => undefined);
  const c = new pg.Client({ connectionString: url });
  await c.connect();
  try {
    const rand = mulberry32(20240601);
    const slug = "bench-site";
    const site = await c.query<{ id: number }>(`INSERT INTO "Site"(slug, name, "timeZone") VALUES ($1, 'Bench: riverside excavation', 'Europe/Zurich') RETURNING id`, [slug]);
    const siteId = site.rows[0].id;
    // Points on a jittered grid, 480 m × 320 m, origin at a plausible grid position.
    const nx = Math.max(2, Math.round(Math.sqrt(opts.points * 1.5)));
    const ny = Math.max(2, Math.ceil(opts.points / nx));
    const dx = 480 / (nx - 1);
    const dy = 320 / (ny - 1);
    const pts: { code: string; e: number; n: number; h: number; ref: boolean }[] = [];
    for (let j = 0; j < ny && pts.length < opts.points; j++)
      for (let i = 0; i < nx && pts.length < opts.points; i++) {
        const code = `P${String(pts.length + 1).padStart(3, "0")}`;
        const edge = i === 0 || j === 0 || i === nx - 1 || j === ny - 1;
        pts.push({ code, e: 2600000 + i * dx + (rand() - 0.5) * dx * 0.5, n: 1200000 + j * dy + (rand() - 0.5) * dy * 0.5, h: 410 + rand() * 5, ref: edge && (i + j) % 7 === 0 });
      }
    const pointIds = await c.query<{ id: number; code: string }>(
      `INSERT INTO "Point"("siteId", code, "isReference") SELECT $1, * FROM unnest($2::text[], $3::bool[]) RETURNING id, code`,
      [siteId, `{${pts.map((p) => p.code).join(",")}}`, `{${pts.map((p) => (p.ref ? "t" : "f")).join(",")}}`],
    );
    const idOf = new Map(pointIds.rows.map((r) => [r.code, r.id]));
    const t0 = Date.UTC(2025, 0, 1, 6);
    const stepMs = (365 * 86_400_000) / opts.epochs;
    const times = Array.from({ length: opts.epochs }, (_, k) => new Date(t0 + k * stepMs).toISOString());
    const ep = await c.query<{ id: number; time: Date }>(
      `INSERT INTO "Epoch"("siteId", time, "contentHash", source) SELECT $1, t, md5(t::text), 'bench' FROM unnest($2::timestamptz[]) t ORDER BY t RETURNING id, time`,
      [siteId, `{${times.join(",")}}`],
    );
    const epochs = ep.rows.sort((a, b) => a.time.getTime() - b.time.getTime());
    await c.query(`UPDATE "Site" SET "referenceEpochId" = $1 WHERE id = $2`, [epochs[0].id, siteId]);
    log(`site ${slug}: ${pts.length} points, ${epochs.length} epochs`);

    // Movement: settlement bowl centred on the excavation, growing through the year.
    const ce = 2600000 + 300;
    const cn = 1200000 + 170;
    const R = 120;
    const coords = (p: (typeof pts)[number], k: number): [number, number, number] => {
      const f = k / Math.max(1, opts.epochs - 1);
      const re = p.e - ce;
      const rn = p.n - cn;
      const r2 = re * re + rn * rn;
      const bowl = Math.exp(-r2 / (R * R));
      const a = -0.00012 * f * f * bowl; // radial strain-like factor: inward movement
      const noise = () => (rand() - 0.5) * 0.0014;
      return [p.e + a * re + noise(), p.n + a * rn + noise(), p.h - 0.04 * f * bowl + noise()];
    };
    const tri = triangulatePlan(pts.map((p) => ({ code: p.code, east: p.e, north: p.n })));
    if (tri.status !== "ok") throw new Error(tri.message);
    const els = await c.query<{ id: number; name: string }>(
      `INSERT INTO "Element"("siteId", name, kind, mode, "pointCodes", source, "minAngleDeg")
       SELECT $1, n, 'triangle', 'plan', string_to_array(pc, ' '), 'triangulation', a FROM unnest($2::text[], $3::text[], $4::float8[]) AS x(n, pc, a) RETURNING id, name`,
      [siteId, `{${tri.triangles.map((t) => `"${t.id}"`).join(",")}}`, `{${tri.triangles.map((t) => `"${t.codes.join(" ")}"`).join(",")}}`, fl(tri.triangles.map((t) => t.minAngleDeg))],
    );
    const elId = new Map(els.rows.map((r) => [r.name, r.id]));
    const triangles = tri.triangles;
    const nT = triangles.length;
    const pIndex = new Map(pts.map((p, i) => [p.code, i]));
    log(`${nT} triangles`);

    const CHUNK = 60;
    let refXYAll: Float64Array | null = null;
    let results = 0;
    const sig = new Float64Array(6 * nT).fill(0.001);
    for (let k0 = 0; k0 < epochs.length; k0 += CHUNK) {
      const k1 = Math.min(epochs.length, k0 + CHUNK);
      const obsPid: number[] = [];
      const obsEid: number[] = [];
      const oe: number[] = [];
      const on: number[] = [];
      const oh: number[] = [];
      const cur = new Float64Array(6 * nT * (k1 - k0));
      const xy = new Float64Array(2 * pts.length);
      for (let k = k0; k < k1; k++) {
        pts.forEach((p, i) => {
          const [e, n, h] = coords(p, k);
          xy[2 * i] = e;
          xy[2 * i + 1] = n;
          obsPid.push(idOf.get(p.code)!);
          obsEid.push(epochs[k].id);
          oe.push(e);
          on.push(n);
          oh.push(h);
        });
        const slot = (k - k0) * nT;
        triangles.forEach((t, ti) =>
          t.codes.forEach((code, v) => {
            const pi = pIndex.get(code)!;
            cur[6 * (slot + ti) + 2 * v] = xy[2 * pi];
            cur[6 * (slot + ti) + 2 * v + 1] = xy[2 * pi + 1];
          }),
        );
        if (k === 0) refXYAll = cur.slice(0, 6 * nT);
      }
      await c.query(
        `INSERT INTO "Observation"("pointId", "epochId", east, north, height, "sigmaEast", "sigmaNorth", "sigmaHeight")
         SELECT p, e, x, y, z, 0.001, 0.001, 0.0015 FROM unnest($1::int[], $2::int[], $3::float8[], $4::float8[], $5::float8[]) AS t(p, e, x, y, z)`,
        [`{${obsPid.join(",")}}`, `{${obsEid.join(",")}}`, fl(oe), fl(on), fl(oh)],
      );
      const nE = k1 - k0;
      const refXY = new Float64Array(6 * nT * nE);
      for (let s = 0; s < nE; s++) refXY.set(refXYAll!, 6 * nT * s);
      const sigmaCur = new Float64Array(6 * nT * nE).fill(0.001);
      // The kernel's layout takes one reference per triangle; run each epoch as its own batch of nT.
      const rows = { el: [] as number[], ep: [] as number[], time: [] as string[], st: [] as string[], gMax: [] as number[], gMin: [] as number[], sh: [] as number[], ar: [] as number[], rot: [] as number[], az: [] as (number | null)[], sgMax: [] as number[], sgMin: [] as number[], ssh: [] as number[], sar: [] as number[] };
      const out = createTriangleBatchOut(nT, true);
      for (let s = 0; s < nE; s++) {
        computeTriangleBatch({ refXY: refXYAll!, curXY: cur.subarray(6 * nT * s, 6 * nT * (s + 1)), sigmaRef: sig, sigmaCur: sigmaCur.subarray(0, 6 * nT) }, out);
        const e = epochs[k0 + s];
        for (let t = 0; t < nT; t++) {
          if (out.status[t] !== BATCH_OK) continue;
          rows.el.push(elId.get(triangles[t].id)!);
          rows.ep.push(e.id);
          rows.time.push(e.time.toISOString());
          rows.st.push("ok");
          rows.gMax.push(out.greenMax[t]);
          rows.gMin.push(out.greenMin[t]);
          rows.sh.push(out.maxShear[t]);
          rows.ar.push(out.arealStrain[t]);
          rows.rot.push(out.rotationDeg[t]);
          rows.az.push(Number.isNaN(out.azimuthMaxDeg[t]) ? null : out.azimuthMaxDeg[t]);
          rows.sgMax.push((out.sigmaGreenMax as Float64Array)[t]);
          rows.sgMin.push((out.sigmaGreenMin as Float64Array)[t]);
          rows.ssh.push((out.sigmaMaxShear as Float64Array)[t]);
          rows.sar.push((out.sigmaArealStrain as Float64Array)[t]);
        }
      }
      await c.query(
        `INSERT INTO "ElementResult"("elementId", "epochId", "referenceEpochId", time, status, "greenMax", "greenMin", "maxShear", "arealStrain", "rotationDeg", "azimuthMaxDeg",
           "sigmaGreenMax", "sigmaGreenMin", "sigmaMaxShear", "sigmaArealStrain")
         SELECT el, ep, $15, tm, st, a, b, c2, d, r, az, s1, s2, s3, s4
           FROM unnest($1::int[], $2::int[], $3::timestamptz[], $4::text[], $5::float8[], $6::float8[], $7::float8[], $8::float8[], $9::float8[], $10::float8[], $11::float8[], $12::float8[], $13::float8[], $14::float8[])
             AS t(el, ep, tm, st, a, b, c2, d, r, az, s1, s2, s3, s4)`,
        [`{${rows.el.join(",")}}`, `{${rows.ep.join(",")}}`, `{${rows.time.join(",")}}`, `{${rows.st.join(",")}}`, fl(rows.gMax), fl(rows.gMin), fl(rows.sh), fl(rows.ar), fl(rows.rot), fl(rows.az), fl(rows.sgMax), fl(rows.sgMin), fl(rows.ssh), fl(rows.sar), epochs[0].id],
      );
      results += rows.el.length;
    }
    log(`${results} element results`);
    // One rule on every element and an alert on the three most extended elements at the last epoch, with a mail in the outbox.
    const last = epochs[epochs.length - 1];
    const rule = await c.query<{ id: number }>(
      `INSERT INTO "TriggerRule"("siteId", name, quantity, "elementIds", "reviewLevel", "alertLevel", "limitLevel", "responseReview", "responseAlert", "responseLimit")
       VALUES ($1, 'Tension in the ground slab', 'greenMax', $2::int[], 0.00005, 0.0001, 0.0002, 'Check the next epoch', 'Walk the slab, photograph cracks', 'Stop excavation, call the engineer') RETURNING id`,
      [siteId, `{${[...elId.values()].join(",")}}`],
    );
    const top = await c.query<{ elementId: number; greenMax: number; sigma: number }>(
      `SELECT "elementId", "greenMax", "sigmaGreenMax" AS sigma FROM "ElementResult" WHERE "epochId" = $1 ORDER BY "greenMax" DESC LIMIT 3`,
      [last.id],
    );
    for (const [i, t] of top.rows.entries()) {
      const level = t.greenMax >= 0.0002 ? "limit" : t.greenMax >= 0.0001 ? "alert" : "review";
      const a = await c.query<{ id: number }>(
        `INSERT INTO "Alert"("siteId", "ruleId", "elementId", level, "peakLevel", "openedAt", "openedEpochId", "lastEpochId", value, sigma, "isSignificant")
         VALUES ($1, $2, $3, $4, $4, $5, $6, $6, $7, $8, $9) RETURNING id`,
        [siteId, rule.rows[0].id, t.elementId, level, last.time, last.id, t.greenMax, t.sigma, t.greenMax > 1.96 * t.sigma],
      );
      await c.query(`INSERT INTO "AlertEvent"("alertId", at, kind, level, value) VALUES ($1, $2, 'open', $3, $4)`, [a.rows[0].id, last.time, level, t.greenMax]);
      if (i === 0)
        await c.query(
          `INSERT INTO "MailMessage"("siteId", "alertId", "idempotencyKey", recipients, subject, body, status) VALUES ($1, $2, $3, '{site.team@example.org}', $4, $5, 'outbox')`,
          [siteId, a.rows[0].id, `bench-${a.rows[0].id}`, `[Epochal] ${level} on the bench site`, `Element ${t.elementId} reached ${level}.`],
        );
    }
    await c.query(`ANALYZE`);

    // An engineer with a session (the benchmark measures the page, not the sign-in).
    const email = "bench.engineer@example.org";
    const password = "bench-password-1";
    const bcrypt = (await import("bcryptjs")).default;
    const user = await c.query<{ id: number }>(`INSERT INTO "User"(email, name, "passwordHash") VALUES ($1, 'Bench Engineer', $2) RETURNING id`, [email, await bcrypt.hash(password, 4)]);
    await c.query(`INSERT INTO "Membership"("userId", "siteId", role) VALUES ($1, $2, 'engineer')`, [user.rows[0].id, siteId]);
    const secret = newSecret("eps");
    await c.query(`INSERT INTO "Session"(id, "userId", "expiresAt") VALUES ($1, $2, now() + interval '1 day')`, [hashSecret(secret), user.rows[0].id]);
    return { siteId, slug, cookie: secret, email, password, points: pts.length, epochs: epochs.length, elements: nT, results };
  } finally {
    await c.end();
  }
}
