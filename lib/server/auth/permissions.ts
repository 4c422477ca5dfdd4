/**
 * Roles per site and what each may do. Each role includes the ones before it.
 *   viewer    reads
 *   surveyor  + uploads epochs, manages points
 *   engineer  + elements, trigger rules, acknowledges alerts
 *   admin     + users, tokens, site settings
 * A global administrator (User.isAdmin) holds `admin` on every site.
 */
export const ROLES = ["viewer", "surveyor", "engineer", "admin"] as const;
export type Role = (typeof ROLES)[number];

export const PERMISSIONS = {
  read: "viewer",
  ingest: "surveyor",
  "manage-points": "surveyor",
  "manage-elements": "engineer",
  "manage-rules": "engineer",
  acknowledge: "engineer",
  administer: "admin",
} as const satisfies Record<string, Role>;
export type Permission = keyof typeof PERMISSIONS;

export const TOKEN_SCOPES = ["ingest", "read"] as const;
export type TokenScope = (typeof TOKEN_SCOPES)[number];

/** What a token of each scope may do: an ingest token posts epochs (and reads them back); a read token only reads. */
const TOKEN_PERMISSIONS: Record<TokenScope, readonly Permission[]> = {
  ingest: ["ingest", "read"],
  read: ["read"],
};

export function isRole(s: string): s is Role {
  return (ROLES as readonly string[]).includes(s);
}

export function roleAllows(role: Role, permission: Permission): boolean {
  return ROLES.indexOf(role) >= ROLES.indexOf(PERMISSIONS[permission]);
}

export function scopeAllows(scope: TokenScope, permission: Permission): boolean {
  return TOKEN_PERMISSIONS[scope].includes(permission);
}
