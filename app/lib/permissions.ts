/**
 * Who may do what. Permissions are data: a capability name maps to the set of roles that hold
 * it. Where ownership matters there is an ":own" and an ":any" variant. The server checks these
 * in every loader, action and API route (see auth.server.ts); the UI uses the same table to
 * hide what a role cannot do.
 */
export const ROLES = ["admin", "editor", "builder", "qc", "apprentice"] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: "Admin",
  editor: "Editor",
  builder: "Senior builder",
  qc: "QC inspector",
  apprentice: "Apprentice",
};

const everyone: readonly Role[] = ROLES;
const staff: readonly Role[] = ["admin", "editor", "builder", "qc"];

export const PERMISSIONS = {
  // Reading the shop's knowledge: every signed-in person.
  "shop:read": everyone,
  "calc:use": everyone,
  "search:use": everyone,
  "search:words:edit": ["admin", "editor"],
  "account:edit-own": everyone,

  // Recordings, marks and readings.
  "recording:upload": staff,
  "recording:download": staff,
  "recording:edit:own": staff,
  "recording:edit:any": ["admin", "editor"],
  "recording:retry": ["admin", "editor"],
  "mark:create": staff,
  "mark:edit:own": staff,
  "mark:edit:any": ["admin", "editor"],
  "reading:create": staff,
  "reading:edit:own": staff,
  "reading:edit:any": ["admin", "editor"],

  // Procedures and their revisions.
  "procedure:draft": ["admin", "editor", "builder"],
  "procedure:edit:own": ["admin", "editor", "builder"],
  "procedure:edit:any": ["admin", "editor"],
  "procedure:view-drafts:own": ["admin", "editor", "builder"],
  "procedure:view-drafts:any": ["admin", "editor"],
  "procedure:review": ["admin", "editor"],
  "procedure:watch": everyone,

  // Test records.
  "testrecord:create": staff,
  "testrecord:amend": ["admin", "editor", "qc"],

  // Administration.
  "user:manage": ["admin"],
  "outbox:view": ["admin"],
  "search:repair": ["admin"],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof PERMISSIONS;

export function can(role: Role | null | undefined, permission: Permission): boolean {
  if (!role) return false;
  return (PERMISSIONS[permission] as readonly Role[]).includes(role);
}

/**
 * Ownership-aware check: `base` is the capability without its suffix ("mark:edit"); the
 * ":any" variant always suffices, the ":own" variant only for the owner.
 */
export function canOnOwned(
  user: { id: string; role: Role } | null | undefined,
  base: "recording:edit" | "mark:edit" | "reading:edit" | "procedure:edit" | "procedure:view-drafts",
  ownerId: string | null | undefined,
): boolean {
  if (!user) return false;
  if (can(user.role, `${base}:any` as Permission)) return true;
  return ownerId != null && ownerId === user.id && can(user.role, `${base}:own` as Permission);
}

export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLES as readonly string[]).includes(value);
}
