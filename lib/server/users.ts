/**
 * Users and their per-site roles. Every change is written with its audit row in one transaction.
 * Passwords are only ever stored as bcrypt hashes (auth/password.ts); audit rows never hold them.
 */
import { getDb } from "./db/client.ts";
import { AppError } from "./errors.ts";
import { recordAudit } from "./audit.ts";
import { assertAcceptablePassword, hashPassword, verifyPassword } from "./auth/password.ts";
import { deleteOtherSessions } from "./auth/sessions.ts";
import { normaliseEmail } from "./auth/signin.ts";
import { actorLabel, type ActorLike } from "./auth/tokens.ts";
import type { Role } from "./auth/permissions.ts";

export type UserInfo = { id: number; email: string; name: string; isAdmin: boolean; disabledAt: Date | null; createdAt: Date };
const userSelect = { id: true, email: true, name: true, isAdmin: true, disabledAt: true, createdAt: true } as const;

export type MembershipInfo = { siteId: number; siteSlug: string; siteName: string; role: string };

export function userJson(u: UserInfo, memberships?: MembershipInfo[]) {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    isAdmin: u.isAdmin,
    disabled: u.disabledAt !== null,
    disabledAt: u.disabledAt?.toISOString() ?? null,
    createdAt: u.createdAt.toISOString(),
    ...(memberships ? { memberships: memberships.map((m) => ({ site: m.siteSlug, siteName: m.siteName, role: m.role })) } : {}),
  };
}

export async function createUser(input: { email: string; name: string; password: string; isAdmin?: boolean }, actor: ActorLike): Promise<UserInfo> {
  const email = normaliseEmail(input.email);
  assertAcceptablePassword(input.password);
  const passwordHash = await hashPassword(input.password);
  const db = getDb();
  const existing = await db.user.findUnique({ where: { email }, select: { id: true } });
  if (existing) throw new AppError("conflict", `A user with e-mail ${email} already exists.`);
  return db.$transaction(async (tx) => {
    const u = await tx.user.create({ data: { email, name: input.name.trim(), passwordHash, isAdmin: input.isAdmin ?? false }, select: userSelect });
    await recordAudit(tx, { actor: actorLabel(actor), action: "user.create", entityType: "User", entityId: String(u.id), after: u });
    return u;
  });
}

export async function findUserByEmail(email: string): Promise<UserInfo | null> {
  return getDb().user.findUnique({ where: { email: normaliseEmail(email) }, select: userSelect });
}

export async function listUsers(): Promise<(UserInfo & { memberships: MembershipInfo[] })[]> {
  const rows = await getDb().user.findMany({
    select: { ...userSelect, memberships: { select: { siteId: true, role: true, site: { select: { slug: true, name: true } } } } },
    orderBy: { email: "asc" },
  });
  return rows.map(({ memberships, ...u }) => ({
    ...u,
    memberships: memberships.map((m) => ({ siteId: m.siteId, siteSlug: m.site.slug, siteName: m.site.name, role: m.role })).sort((a, b) => a.siteSlug.localeCompare(b.siteSlug)),
  }));
}

export async function membershipsOf(userId: number): Promise<MembershipInfo[]> {
  const rows = await getDb().membership.findMany({ where: { userId }, select: { siteId: true, role: true, site: { select: { slug: true, name: true } } } });
  return rows.map((m) => ({ siteId: m.siteId, siteSlug: m.site.slug, siteName: m.site.name, role: m.role })).sort((a, b) => a.siteSlug.localeCompare(b.siteSlug));
}

/**
 * Changes name, admin flag or disabled state. Disabling ends the user's sessions. An
 * administrator may not disable or demote themselves (that would lock out the last one too easily).
 */
export async function updateUser(userId: number, change: { name?: string; isAdmin?: boolean; disabled?: boolean }, actor: string | { label: string; userId?: number }): Promise<UserInfo> {
  const selfId = typeof actor === "string" ? undefined : actor.userId;
  if (selfId === userId && (change.disabled === true || change.isAdmin === false)) throw new AppError("conflict", "You may not disable or demote yourself.");
  const db = getDb();
  const after = await db.$transaction(async (tx) => {
    const before = await tx.user.findUnique({ where: { id: userId }, select: userSelect });
    if (!before) throw new AppError("not_found", `No user ${userId}.`);
    const data: { name?: string; isAdmin?: boolean; disabledAt?: Date | null } = {};
    if (change.name !== undefined) data.name = change.name.trim();
    if (change.isAdmin !== undefined) data.isAdmin = change.isAdmin;
    if (change.disabled !== undefined) data.disabledAt = change.disabled ? (before.disabledAt ?? new Date()) : null;
    const u = await tx.user.update({ where: { id: userId }, data, select: userSelect });
    const action = change.disabled === true && !before.disabledAt ? "user.disable" : change.disabled === false && before.disabledAt ? "user.enable" : "user.update";
    await recordAudit(tx, { actor: actorLabel(actor), action, entityType: "User", entityId: String(userId), before, after: u });
    return u;
  });
  if (after.disabledAt) await deleteOtherSessions(userId, null);
  return after;
}

/** Sets (role) or removes (null) a user's role on a site. */
export async function grantRole(userId: number, siteId: number, role: Role | null, actor: ActorLike): Promise<void> {
  const db = getDb();
  await db.$transaction(async (tx) => {
    const user = await tx.user.findUnique({ where: { id: userId }, select: { id: true, email: true } });
    if (!user) throw new AppError("not_found", `No user ${userId}.`);
    const before = await tx.membership.findUnique({ where: { userId_siteId: { userId, siteId } }, select: { userId: true, siteId: true, role: true } });
    if (role === null) {
      if (!before) return;
      await tx.membership.delete({ where: { userId_siteId: { userId, siteId } } });
    } else {
      if (before?.role === role) return;
      await tx.membership.upsert({ where: { userId_siteId: { userId, siteId } }, create: { userId, siteId, role }, update: { role } });
    }
    await recordAudit(tx, {
      actor: actorLabel(actor),
      siteId,
      action: role === null ? "membership.revoke" : "membership.grant",
      entityType: "Membership",
      entityId: `${userId}:${siteId}`,
      before: before ? { email: user.email, role: before.role } : null,
      after: role === null ? null : { email: user.email, role },
    });
  });
}

/**
 * Changes a user's own password after checking the current one. All other sessions of the
 * user end; the one holding `keepSessionSecret` (the browser that made the change) stays.
 */
export async function changePassword(userId: number, currentPassword: string, newPassword: string, keepSessionSecret: string | null): Promise<{ endedSessions: number }> {
  const db = getDb();
  const user = await db.user.findUnique({ where: { id: userId } });
  if (!user || user.disabledAt) throw new AppError("unauthenticated", "Sign in first.");
  if (!(await verifyPassword(currentPassword, user.passwordHash)))
    throw new AppError("invalid", "The current password is wrong.", { errors: [{ line: null, field: "currentPassword", message: "The current password is wrong." }] });
  assertAcceptablePassword(newPassword, "newPassword");
  if (newPassword === currentPassword)
    throw new AppError("invalid", "The new password must differ from the current one.", { errors: [{ line: null, field: "newPassword", message: "Same as the current password." }] });
  const passwordHash = await hashPassword(newPassword);
  await db.$transaction(async (tx) => {
    await tx.user.update({ where: { id: userId }, data: { passwordHash } });
    await recordAudit(tx, { actor: `user:${user.email}`, action: "user.password-change", entityType: "User", entityId: String(userId) });
  });
  return { endedSessions: await deleteOtherSessions(userId, keepSessionSecret) };
}

/** Sets a password without the current one (administrator or CLI reset); ends all the user's sessions. */
export async function resetPassword(userId: number, newPassword: string, actor: ActorLike): Promise<void> {
  assertAcceptablePassword(newPassword);
  const passwordHash = await hashPassword(newPassword);
  await getDb().$transaction(async (tx) => {
    await tx.user.update({ where: { id: userId }, data: { passwordHash } });
    await recordAudit(tx, { actor: actorLabel(actor), action: "user.password-reset", entityType: "User", entityId: String(userId) });
  });
  await deleteOtherSessions(userId, null);
}

/**
 * The first administrator from the environment: when EPOCHAL_ADMIN_EMAIL and
 * EPOCHAL_ADMIN_PASSWORD are set and the database has no user at all, creates that user as a
 * global administrator (EPOCHAL_ADMIN_NAME, default "Administrator"). Does nothing otherwise;
 * safe to call at every start. Returns a note for the launcher to print, or null.
 */
export async function ensureFirstAdmin(env: Record<string, string | undefined> = process.env): Promise<string | null> {
  const email = env.EPOCHAL_ADMIN_EMAIL?.trim();
  const password = env.EPOCHAL_ADMIN_PASSWORD;
  if (!email || !password) return null;
  const db = getDb();
  if ((await db.user.count()) > 0) return null;
  try {
    const u = await createUser({ email, name: env.EPOCHAL_ADMIN_NAME?.trim() || "Administrator", password, isAdmin: true }, "system:first-start");
    return `Created the first administrator ${u.email} from EPOCHAL_ADMIN_EMAIL / EPOCHAL_ADMIN_PASSWORD.`;
  } catch (err) {
    // Two processes starting at once: the other one created it.
    if (err instanceof AppError && err.code === "conflict") return null;
    throw err;
  }
}
