/** Set-up: trigger rules — list, enable/disable, create from a literature preset or by hand — and who is mailed at which level. */
import type { Metadata } from "next";
import { requireSiteRole } from "@/app/_server/auth.ts";
import { getDb } from "@/lib/server/db/client.ts";
import { listRules, ruleJson } from "@/lib/server/rules.ts";
import { listElements } from "@/lib/server/elements.ts";
import { SetupTabs } from "@/app/_components/setup/SetupTabs.tsx";
import { RulesEditor } from "@/app/_components/setup/RulesEditor.tsx";
import { RecipientsEditor } from "@/app/_components/setup/RecipientsEditor.tsx";
import { listRecipients, recipientJson } from "@/lib/server/mail/recipients.ts";
import { mailConfigFromEnv } from "@/lib/server/mail/config.ts";

export const dynamic = "force-dynamic";
export const metadata: Metadata = { title: "Set-up · trigger rules" };

export default async function RulesSetupPage({ params }: { params: Promise<{ slug: string }> }) {
  const { slug } = await params;
  const { site } = await requireSiteRole(slug, "manage-rules", `/sites/${slug}/setup/rules`);
  const [rules, elements, recipients] = await Promise.all([listRules(site.id), listElements(getDb(), site), listRecipients(site.id)]);
  const mail = mailConfigFromEnv();
  return (
    <main id="main" className="wide">
      <h1>Set-up · {site.name}</h1>
      <SetupTabs slug={site.slug} current="rules" />
      <p className="muted">
        Each rule watches a quantity on a set of elements with three rising levels (review, alert, limit) and the response the engineer writes for each. The levels are the site
        engineer&apos;s decision; presets only offer published starting points.
      </p>
      <RulesEditor slug={site.slug} rules={rules.map(ruleJson)} elements={elements.map((e) => ({ id: e.id, name: e.name, kind: e.kind }))} />
      <RecipientsEditor slug={site.slug} recipients={recipients.map(recipientJson)} hasSmtp={mail.smtpUrl !== null} digestMinutes={mail.digestMinutes} />
    </main>
  );
}
