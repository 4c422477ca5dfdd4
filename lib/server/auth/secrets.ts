/**
 * Opaque secrets (session cookies, API tokens): random, shown once, stored only as a SHA-256
 * hash. A database leak then reveals no usable credential; lookups stay a unique-index probe.
 */
import { createHash, randomBytes } from "node:crypto";

export function newSecret(prefix: string): string {
  return `${prefix}_${randomBytes(24).toString("base64url")}`;
}

export function hashSecret(secret: string): string {
  return createHash("sha256").update(secret, "utf8").digest("hex");
}

export const SESSION_COOKIE = "epochal_session";
