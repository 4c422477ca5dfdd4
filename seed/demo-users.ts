/**
 * Demo accounts, one per role, for the invented demo site only. The passwords are public on purpose
 * (printed by `npm run demo` and stated in the README): never use them on a real installation.
 */
export const DEMO_USERS = [
  { email: "viewer@demo.epochal.test", name: "Vera Viewer (demo)", role: "viewer", password: "demo-viewer-2026" },
  { email: "surveyor@demo.epochal.test", name: "Sam Surveyor (demo)", role: "surveyor", password: "demo-surveyor-2026" },
  { email: "engineer@demo.epochal.test", name: "Erin Engineer (demo)", role: "engineer", password: "demo-engineer-2026" },
  { email: "admin@demo.epochal.test", name: "Ada Admin (demo)", role: "admin", password: "demo-admin-2026" },
] as const;

export type DemoUser = (typeof DEMO_USERS)[number];

/** Invented mail recipients for the demo site's alerts (example.org is reserved for examples, RFC 2606). */
export const DEMO_RECIPIENTS = [
  { email: "site-engineer@example.org", minLevel: "review", digest: false },
  { email: "project-manager@example.org", minLevel: "alert", digest: false },
  { email: "party-wall-surveyor@example.org", minLevel: "alert", digest: true },
] as const;

/** The lines `npm run demo` prints after the URL. */
export function demoCredentialLines(): string[] {
  return ["Demo accounts (demo passwords, public on purpose):", ...DEMO_USERS.map((u) => `  ${u.role.padEnd(9)} ${u.email.padEnd(29)} ${u.password}`)];
}
