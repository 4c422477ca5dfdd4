"use server";
/** Administrator actions on users. Each one checks the administrator on the server again. */
import { redirect } from "next/navigation";
import { revalidatePath } from "next/cache";
import { createUser, grantRole, updateUser } from "@/lib/server/users.ts";
import { isAppError } from "@/lib/server/errors.ts";
import { isRole } from "@/lib/server/auth/permissions.ts";
import { UserCreateBody, parseWith } from "@/lib/server/auth/schemas.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { requireAdmin } from "@/app/_server/auth.ts";

function text(fd: FormData, name: string, max = 300): string {
  const v = fd.get(name);
  return typeof v === "string" ? v.slice(0, max) : "";
}

function codeOf(err: unknown): string {
  if (!isAppError(err)) throw err;
  if (err.code === "conflict") return /yourself/.test(err.message) ? "self" : "exists";
  if (err.code === "not_found") return "missing";
  if (err.errors?.some((e) => e.field === "password")) return "weak";
  return "invalid";
}

export async function createUserAction(fd: FormData): Promise<void> {
  const admin = await requireAdmin();
  let target = "/admin?done=created";
  try {
    const body = parseWith(UserCreateBody, { email: text(fd, "email"), name: text(fd, "name"), password: text(fd, "password", 500), isAdmin: fd.get("isAdmin") === "on" });
    await createUser(body, admin);
  } catch (err) {
    target = `/admin?error=${codeOf(err)}`;
  }
  revalidatePath("/admin");
  redirect(target);
}

export async function setDisabledAction(fd: FormData): Promise<void> {
  const admin = await requireAdmin();
  const id = Number(text(fd, "userId"));
  let target = `/admin?done=${fd.get("disabled") === "1" ? "disabled" : "enabled"}`;
  try {
    await updateUser(id, { disabled: fd.get("disabled") === "1" }, admin);
  } catch (err) {
    target = `/admin?error=${codeOf(err)}`;
  }
  revalidatePath("/admin");
  redirect(target);
}

export async function grantRoleAction(fd: FormData): Promise<void> {
  const admin = await requireAdmin();
  const userId = Number(text(fd, "userId"));
  const siteId = Number(text(fd, "siteId"));
  const role = text(fd, "role");
  let target = "/admin?done=granted";
  try {
    if (!(role === "none" || isRole(role))) throw new Error("bad role");
    const site = await getDb().site.findUnique({ where: { id: siteId }, select: { id: true } });
    if (!site) {
      target = "/admin?error=missing";
    } else await grantRole(userId, site.id, role === "none" ? null : role, admin);
  } catch (err) {
    target = `/admin?error=${err instanceof Error && err.message === "bad role" ? "invalid" : codeOf(err)}`;
  }
  revalidatePath("/admin");
  redirect(target);
}
