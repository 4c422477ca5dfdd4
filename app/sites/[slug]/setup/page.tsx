/** Set-up: points, elements, trigger rules and uploads. Opens the first section the user's role allows. */
import { redirect } from "next/navigation";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { roleAllows } from "@/lib/server/auth/permissions.ts";

export const dynamic = "force-dynamic";

export default async function SetupIndex({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site, role } = await requireSiteRole(slug, "manage-points", `/sites/${slug}/setup`);
  redirect(`/sites/${site.slug}/setup/${roleAllows(role, "manage-elements") ? "elements" : "points"}`);
}
