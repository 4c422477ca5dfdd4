/**
 * HTTP side of ingest: size limit, content type, body text, query, and the format's parser.
 * Accepted types: `text/csv` (epoch CSV), `application/json` (epoch JSON), `application/geo+json`.
 * Size: at most EPOCHAL_MAX_UPLOAD_BYTES (default 50 MB), checked on Content-Length first and again
 * while the body is read, so a missing or false header cannot get a larger body in.
 */
import { AppError } from "../errors.ts";
import { getDb } from "../db/client.ts";
import { ingestQuerySchema, queryIssues } from "../schemas/ingest.ts";
import { parseEpochCsvInput } from "./csv-input.ts";
import { parseEpochJsonText, type EpochInput } from "../../formats/epoch-json.ts";
import { parseEpochGeoJsonText } from "../../formats/epoch-geojson.ts";
import { enuFrame } from "../../geodesy/enu.ts";

export const DEFAULT_MAX_UPLOAD_BYTES = 50 * 1024 * 1024;

export function maxUploadBytes(): number {
  const v = Number(process.env.EPOCHAL_MAX_UPLOAD_BYTES);
  return Number.isFinite(v) && v > 0 ? Math.floor(v) : DEFAULT_MAX_UPLOAD_BYTES;
}

export const INGEST_CONTENT_TYPES = { "text/csv": "csv", "application/json": "json", "application/geo+json": "geojson" } as const;
export type IngestFormat = (typeof INGEST_CONTENT_TYPES)[keyof typeof INGEST_CONTENT_TYPES];

export function ingestFormatOf(contentType: string | null): IngestFormat | null {
  if (!contentType) return null;
  const base = contentType.split(";")[0].trim().toLowerCase();
  return (INGEST_CONTENT_TYPES as Record<string, IngestFormat>)[base] ?? null;
}

function tooLarge(limit: number): AppError {
  return new AppError("too_large", `The body is larger than the upload limit of ${limit} bytes (EPOCHAL_MAX_UPLOAD_BYTES); split the backfill into several files.`, { details: { limitBytes: limit } });
}

/** The body as UTF-8 text, refusing more than `limit` bytes whatever Content-Length says. */
export async function readBodyText(req: Request, limit: number): Promise<string> {
  const declared = req.headers.get("content-length");
  if (declared !== null && Number(declared) > limit) throw tooLarge(limit);
  if (!req.body) return "";
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > limit) {
      await reader.cancel().catch(() => undefined);
      throw tooLarge(limit);
    }
    chunks.push(value);
  }
  const buf = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    buf.set(c, at);
    at += c.byteLength;
  }
  try {
    return new TextDecoder("utf-8", { fatal: true }).decode(buf);
  } catch {
    throw new AppError("invalid", "The body is not valid UTF-8 text.", { errors: [{ line: null, field: null, message: "the body is not valid UTF-8; save the file as UTF-8" }] });
  }
}

export interface ParsedIngestRequest {
  epochs: EpochInput[];
  revise: boolean;
  format: IngestFormat;
}

/** Reads and parses a POST to /api/v1/sites/{slug}/epochs; throws AppError 413, 415 or 422. */
export async function parseIngestRequest(req: Request, siteId: number): Promise<ParsedIngestRequest> {
  const limit = maxUploadBytes();
  const declared = req.headers.get("content-length");
  if (declared !== null && Number(declared) > limit) throw tooLarge(limit);
  const format = ingestFormatOf(req.headers.get("content-type"));
  if (!format) {
    throw new AppError("unsupported_media_type", `Content-Type must be one of ${Object.keys(INGEST_CONTENT_TYPES).join(", ")}; got ${JSON.stringify(req.headers.get("content-type") ?? "none")}.`);
  }
  const url = new URL(req.url);
  const q = ingestQuerySchema.safeParse(Object.fromEntries(url.searchParams));
  if (!q.success) throw new AppError("invalid", "Bad query parameters.", { errors: queryIssues(q.error) });
  const text = await readBodyText(req, limit);
  const opts = q.data.time === undefined ? {} : { defaultTime: q.data.time };
  let r;
  if (format === "csv") r = parseEpochCsvInput(text, opts);
  else if (format === "json") r = parseEpochJsonText(text, opts);
  else {
    const site = await getDb().site.findUnique({ where: { id: siteId }, select: { originLatDeg: true, originLonDeg: true, originHeightM: true } });
    if (!site || site.originLatDeg === null || site.originLonDeg === null || site.originHeightM === null) {
      throw new AppError("invalid", "This site has no geodetic origin, so WGS84 positions cannot be converted to its local frame; set the origin (latitude, longitude, height) first.", {
        errors: [{ line: null, field: null, message: "the site has no origin (Site.originLatDeg, originLonDeg, originHeightM)" }],
      });
    }
    r = parseEpochGeoJsonText(text, enuFrame({ latDeg: site.originLatDeg, lonDeg: site.originLonDeg, heightM: site.originHeightM }), opts);
  }
  if (!r.ok) throw new AppError("invalid", "The file has errors; nothing was stored.", { errors: r.errors });
  return { epochs: r.epochs, revise: q.data.revise ?? false, format };
}
