/**
 * zod schemas for the sign-in, account, user and token boundaries (API bodies, forms, CLI).
 * Kept beside the auth code they guard; length limits stop oversized fields before any hashing.
 */
import { z } from "zod";
import { AppError, type FieldError } from "../errors.ts";
import { ROLES, TOKEN_SCOPES } from "./permissions.ts";

const email = z.string().trim().toLowerCase().min(3).max(254).pipe(z.email({ message: "Not an e-mail address." }));
const anyPassword = z.string().min(1, "Enter the password.").max(500);

export const SignInBody = z.object({ email: z.string().trim().min(1, "Enter the e-mail address.").max(254), password: anyPassword }).strict();
export const PasswordChangeBody = z.object({ currentPassword: anyPassword, newPassword: z.string().max(500) }).strict();
export const UserCreateBody = z
  .object({ email, name: z.string().trim().min(1).max(120), password: z.string().max(500), isAdmin: z.boolean().default(false) })
  .strict();
export const UserUpdateBody = z.object({ disabled: z.boolean().optional(), isAdmin: z.boolean().optional(), name: z.string().trim().min(1).max(120).optional() }).strict();
/** role null removes the membership. */
export const MembershipBody = z.object({ site: z.string().trim().min(1).max(100), role: z.enum(ROLES).nullable() }).strict();
export const TokenCreateBody = z.object({ scope: z.enum(TOKEN_SCOPES), name: z.string().trim().max(100).default("") }).strict();

/** Parses with a schema; failure is AppError("invalid") with one FieldError per issue. */
export function parseWith<S extends z.ZodType>(schema: S, value: unknown): z.output<S> {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const errors: FieldError[] = r.error.issues.map((i) => ({ line: null, field: i.path.join(".") || null, message: i.message }));
  throw new AppError("invalid", errors.map((e) => (e.field ? `${e.field}: ${e.message}` : e.message)).join("; "), { errors });
}
