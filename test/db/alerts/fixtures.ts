/**
 * Fixtures for the alert tests: a site with elements, epochs and ElementResult rows written directly
 * with chosen values (the alert engine is tested on them), and a real SMTP server on a free port.
 */
import { SMTPServer } from "smtp-server";
import type { Db } from "../../../lib/server/db/client.ts";
import { uniqueSlug } from "../../support/unique.ts";

export const UE = 1e-6;
const DAY_MS = 86_400_000;

export type Fixture = { siteId: number; slug: string; refEpochId: number; triangles: number[]; baseline: number; t0: number; nextDay: number };

export async function createSite(db: Db, opts: { timeZone?: string; triangles?: number } = {}): Promise<Fixture> {
  const slug = uniqueSlug("alerts");
  const site = await db.site.create({ data: { slug, name: `Site ${slug}`, timeZone: opts.timeZone ?? "Europe/Berlin" } });
  const t0 = Date.UTC(2026, 0, 5, 8, 0, 0);
  const ref = await db.epoch.create({ data: { siteId: site.id, time: new Date(t0), contentHash: "ref" } });
  await db.site.update({ where: { id: site.id }, data: { referenceEpochId: ref.id } });
  const triangles: number[] = [];
  for (let i = 0; i < (opts.triangles ?? 2); i++) {
    const el = await db.element.create({
      data: { siteId: site.id, name: `T${i + 1}`, label: `Building A, bay ${i + 1}`, kind: "triangle", mode: "plan", pointCodes: [`P${i}`, `P${i + 1}`, `P${i + 2}`] },
    });
    triangles.push(el.id);
  }
  const b = await db.element.create({ data: { siteId: site.id, name: "B1", label: "crack gauge line", kind: "baseline", mode: "horizontal", pointCodes: ["P0", "P9"] } });
  return { siteId: site.id, slug, refEpochId: ref.id, triangles, baseline: b.id, t0, nextDay: 1 };
}

export type ResultValues = { greenMax?: number; sigmaGreenMax?: number; greenMin?: number; sigmaGreenMin?: number; engineering?: number; sigmaEngineering?: number; status?: string };

/**
 * One new epoch (a day after the previous one) with a result row per given element; values in µε.
 * Returns the epoch id.
 */
export async function addEpoch(db: Db, fx: Fixture, values: Record<number, ResultValues>): Promise<number> {
  const time = new Date(fx.t0 + fx.nextDay * DAY_MS);
  fx.nextDay += 1;
  const ep = await db.epoch.create({ data: { siteId: fx.siteId, time, contentHash: `e${fx.nextDay}` } });
  for (const [elementId, v] of Object.entries(values)) {
    const u = (x: number | undefined) => (x === undefined ? null : x * UE);
    await db.elementResult.create({
      data: {
        elementId: Number(elementId),
        epochId: ep.id,
        referenceEpochId: fx.refEpochId,
        time,
        status: v.status ?? "ok",
        greenMax: u(v.greenMax),
        sigmaGreenMax: u(v.sigmaGreenMax ?? (v.greenMax === undefined ? undefined : 20)),
        greenMin: u(v.greenMin),
        sigmaGreenMin: u(v.sigmaGreenMin ?? (v.greenMin === undefined ? undefined : 20)),
        engineering: u(v.engineering),
        sigmaEngineering: u(v.sigmaEngineering ?? (v.engineering === undefined ? undefined : 20)),
      },
    });
  }
  return ep.id;
}

export async function createGreenMaxRule(db: Db, fx: Fixture, over: Partial<{ elementIds: number[]; hysteresis: number; significantOnly: boolean; quantity: string }> = {}) {
  return db.triggerRule.create({
    data: {
      siteId: fx.siteId,
      name: "Building A tension",
      quantity: over.quantity ?? "greenMax",
      elementIds: over.elementIds ?? fx.triangles,
      reviewLevel: 500 * UE,
      alertLevel: 750 * UE,
      limitLevel: 1500 * UE,
      hysteresis: (over.hysteresis ?? 50) * UE,
      significantOnly: over.significantOnly ?? true,
      responseReview: "Check the survey; inspect the building.",
      responseAlert: "Call the engineer; inspect cracks.",
      responseLimit: "Stop excavation in bay 3.",
    },
  });
}

export type ReceivedMail = { from: string; to: string[]; raw: string };

/** A real SMTP server (smtp-server) on 127.0.0.1; `port` 0 picks a free one. */
export async function startSmtp(port = 0): Promise<{ port: number; mails: ReceivedMail[]; close: () => Promise<void> }> {
  const mails: ReceivedMail[] = [];
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ["STARTTLS", "AUTH"],
    logger: false,
    onData(stream, session, callback) {
      const chunks: Buffer[] = [];
      stream.on("data", (c: Buffer) => chunks.push(c));
      stream.on("end", () => {
        mails.push({
          from: session.envelope.mailFrom ? session.envelope.mailFrom.address : "",
          to: session.envelope.rcptTo.map((r) => r.address),
          raw: Buffer.concat(chunks).toString("utf8"),
        });
        callback();
      });
    },
  });
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, "127.0.0.1", () => resolve());
  });
  const addr = server.server.address();
  const actual = typeof addr === "object" && addr ? addr.port : port;
  return { port: actual, mails, close: () => new Promise<void>((r) => server.close(() => r())) };
}

/** Decoded text of a received mail (quoted-printable soft breaks joined). */
export function mailText(raw: string): string {
  const body = raw.split(/\r?\n\r?\n/).slice(1).join("\n\n");
  return body
    .replace(/=\r?\n/g, "")
    .replace(/(=[0-9A-F]{2})+/g, (m) => Buffer.from(m.split("=").filter(Boolean).map((h) => parseInt(h, 16))).toString("utf8"));
}

export async function waitFor<T>(what: string, fn: () => Promise<T | null | undefined | false>, timeoutMs = 30_000): Promise<T> {
  const start = Date.now();
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() - start > timeoutMs) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

/** The decoded Subject header of a received mail (RFC 2047 encoded words, folded lines). */
export function mailSubject(raw: string): string {
  const head = raw.split(/\r?\n\r?\n/)[0].replace(/\r?\n[ \t]+/g, " ");
  const line = /^Subject: (.*)$/im.exec(head)?.[1] ?? "";
  return line.replace(/\?=\s+=\?/g, "?==?").replace(/=\?UTF-8\?([QB])\?(.*?)\?=/gi, (_m, enc: string, text: string) => {
    if (enc.toUpperCase() === "B") return Buffer.from(text, "base64").toString("utf8");
    const bytes = text.replace(/_/g, " ").replace(/=([0-9A-F]{2})/gi, (_x, h: string) => String.fromCharCode(parseInt(h, 16)));
    return Buffer.from(bytes, "latin1").toString("utf8");
  });
}
