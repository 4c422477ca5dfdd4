"use server";
import { redirect } from "next/navigation";
import { changePassword } from "@/lib/server/users.ts";
import { isAppError } from "@/lib/server/errors.ts";
import { requireUser, sessionSecret } from "@/app/_server/auth.ts";

/** Password change from the account page; ends the user's other sessions, keeps this one. */
export async function changePasswordAction(fd: FormData): Promise<void> {
  const user = await requireUser("/account");
  const current = String(fd.get("currentPassword") ?? "").slice(0, 500);
  const next = String(fd.get("newPassword") ?? "").slice(0, 500);
  const repeat = String(fd.get("repeatPassword") ?? "").slice(0, 500);
  if (next !== repeat) redirect("/account?error=mismatch");
  let target: string;
  try {
    const r = await changePassword(user.userId, current, next, await sessionSecret());
    target = `/account?changed=1&ended=${r.endedSessions}`;
  } catch (err) {
    if (!isAppError(err)) throw err;
    const f = err.errors?.[0]?.field;
    target = `/account?error=${f === "currentPassword" ? "current" : /differ/.test(err.message) ? "same" : "weak"}`;
  }
  redirect(target);
}
