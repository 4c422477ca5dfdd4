/**
 * Reading JSON request bodies with a size limit. The limit is checked against Content-Length
 * first and then while streaming (a chunked body has no Content-Length), so an oversized body is
 * never held in memory whole: 413 via AppError("too_large"). Wrong media type: 415; bad JSON: 400.
 */
import { AppError } from "../errors.ts";

/** Default limit for small JSON bodies (sign-in, settings): 64 KiB. */
export const SMALL_JSON_BYTES = 64 * 1024;

export async function readBodyBytes(req: Request, maxBytes: number): Promise<Uint8Array> {
  const declared = req.headers.get("content-length");
  if (declared !== null && Number(declared) > maxBytes) throw new AppError("too_large", `Request body is larger than ${maxBytes} bytes.`);
  if (!req.body) return new Uint8Array(0);
  const reader = req.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => undefined);
      throw new AppError("too_large", `Request body is larger than ${maxBytes} bytes.`);
    }
    chunks.push(value);
  }
  const out = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    out.set(c, at);
    at += c.byteLength;
  }
  return out;
}

export async function readJsonBody(req: Request, maxBytes: number = SMALL_JSON_BYTES): Promise<unknown> {
  const type = (req.headers.get("content-type") ?? "").split(";")[0].trim().toLowerCase();
  // Requiring application/json also keeps cross-site HTML forms out (they cannot send it without a CORS preflight).
  if (type !== "application/json") throw new AppError("unsupported_media_type", "Send the body as application/json.");
  const bytes = await readBodyBytes(req, maxBytes);
  const text = new TextDecoder("utf-8", { fatal: false }).decode(bytes);
  if (text.trim() === "") throw new AppError("bad_request", "The request body is empty; JSON expected.");
  try {
    return JSON.parse(text) as unknown;
  } catch {
    throw new AppError("bad_request", "The request body is not valid JSON.");
  }
}
