/** Tabs of the set-up pages; the current one is marked for screen readers too. */
import Link from "next/link";

const TABS = [
  { key: "points", label: "Points" },
  { key: "elements", label: "Elements" },
  { key: "rules", label: "Trigger rules" },
  { key: "upload", label: "Upload epochs" },
] as const;

export function SetupTabs({ slug, current }: { slug: string; current: (typeof TABS)[number]["key"] }) {
  return (
    <nav className="tabs no-print" aria-label="Set-up">
      {TABS.map((t) => (
        <Link key={t.key} href={`/sites/${slug}/setup/${t.key}`} aria-current={t.key === current ? "page" : undefined}>
          {t.label}
        </Link>
      ))}
    </nav>
  );
}
