"use server";
/** Acknowledging an alert from the dashboard: a server action calling the alerts service (engineer role, checked here). */
import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import { requireSiteRole, safeNext } from "@/app/_server/auth.ts";
import { acknowledgeAlert } from "@/lib/server/alerts/alerts.ts";
import { isAppError } from "@/lib/server/errors.ts";

export async function acknowledgeAlertAction(form: FormData): Promise<void> {
  const slug = String(form.get("slug") ?? "");
  const id = Number(form.get("alertId"));
  const comment = String(form.get("comment") ?? "");
  const back = safeNext(String(form.get("back") ?? ""), `/sites/${slug}/alerts`);
  const { user, site } = await requireSiteRole(slug, "acknowledge", back);
  const sep = back.includes("?") ? "&" : "?";
  try {
    await acknowledgeAlert(site.id, id, comment, user);
  } catch (e) {
    if (isAppError(e)) redirect(`${back}${sep}ackError=${encodeURIComponent(e.message)}&ackId=${id}`);
    throw e;
  }
  revalidatePath(back);
  redirect(`${back}${sep}acked=${id}`);
}
