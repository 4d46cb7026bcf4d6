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
  // An unfinished upload (continue it, ask after it, discard it): its starter's, or anyone's.
  "upload:manage:own": staff,
  "upload:manage:any": ["admin"],
  "mark:create": staff,
  "mark:edit:own": staff,
  "mark:edit:any": ["admin", "editor"],
  "reading:create": staff,
  "reading:edit:own": staff,
  "reading:edit:any": ["admin", "editor"],
  // Captions belong to the recording: whoever may add and change marks may attach and correct them.
  "caption:edit": staff,

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

  // Runs: a procedure worked step by step on a build (apprentices read them with shop:read).
  "run:work": staff,

  // Builds: one engine job and everything measured and filed for it.
  "builds:read": everyone,
  "builds:write": staff,

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
  base: "recording:edit" | "upload:manage" | "mark:edit" | "reading:edit" | "procedure:edit" | "procedure:view-drafts",
  ownerId: string | null | undefined,
): boolean {
  if (!user) return false;
  if (can(user.role, `${base}:any` as Permission)) return true;
  return ownerId != null && ownerId === user.id && can(user.role, `${base}:own` as Permission);
}

/** The role's name for a group of people, as a sentence begins with it. */
export const ROLE_PLURALS: Record<Role, string> = {
  admin: "Admins",
  editor: "Editors",
  builder: "Senior builders",
  qc: "QC inspectors",
  apprentice: "Apprentices",
};

/** A person of the role, as the end of "Ask …". */
const ROLE_ASK: Record<Role, string> = {
  admin: "an admin",
  editor: "an editor",
  builder: "a senior builder",
  qc: "a QC inspector",
  apprentice: "an apprentice",
};

/** What each role does in the shop, in the words of "Apprentices can …". */
export const ROLE_CAN: Record<Role, string> = {
  admin: "do everything in Benchreel",
  editor: "write, review and publish procedures and look after recordings",
  builder: "write procedures, record work at the bench and file test records",
  qc: "record work at the bench, file test records and amend them",
  apprentice: "read procedures, watch recordings and use the calculators",
};

/**
 * What each capability lets a person do, in the shop's words, as the end of "… but not …".
 * A 403 page and the API's forbidden reason say this, never the capability's name.
 */
export const CAPABILITY_WORDS: Record<Permission, string> = {
  "shop:read": "read the shop's procedures and recordings",
  "calc:use": "use the calculators",
  "search:use": "search",
  "search:words:edit": "change the search words",
  "account:edit-own": "change their own account",
  "recording:upload": "upload recordings",
  "recording:download": "download original video files",
  "recording:edit:own": "change a recording's details",
  "recording:edit:any": "change other people's recordings",
  "recording:retry": "start a recording's processing again",
  "upload:manage:own": "continue or discard their unfinished uploads",
  "upload:manage:any": "continue or discard other people's unfinished uploads",
  "mark:create": "add marks to a recording",
  "mark:edit:own": "change marks",
  "mark:edit:any": "change other people's marks",
  "reading:create": "enter readings",
  "reading:edit:own": "change readings",
  "reading:edit:any": "change other people's readings",
  "caption:edit": "attach or correct a recording's captions",
  "procedure:draft": "write procedures",
  "procedure:edit:own": "change procedure drafts",
  "procedure:edit:any": "change other people's procedure drafts",
  "procedure:view-drafts:own": "open procedure drafts",
  "procedure:view-drafts:any": "open other people's procedure drafts",
  "procedure:review": "review and publish procedures",
  "procedure:watch": "follow procedures",
  "testrecord:create": "file test records",
  "testrecord:amend": "amend test records",
  "run:work": "work procedures step by step on a build",
  "builds:read": "look at builds",
  "builds:write": "open and change builds",
  "user:manage": "manage people's accounts",
  "outbox:view": "see the mail outbox",
  "search:repair": "repair the search index",
};

function listWithOr(items: string[]): string {
  return items.length <= 1 ? (items[0] ?? "") : `${items.slice(0, -1).join(", ")} or ${items[items.length - 1]}`;
}

/**
 * Why a role may not do something, in the shop's words: what the role can do, what it cannot,
 * and whom to ask ("Apprentices can read procedures, … but not write procedures. Ask a senior
 * builder, an editor or an admin.").
 */
export function forbiddenReason(role: Role, permission: Permission): string {
  const holders = (PERMISSIONS[permission] as readonly Role[]).filter((r) => r !== role);
  // Most capabilities are held by several roles: name those who do the work before the admin.
  const ask = [...holders.filter((r) => r !== "admin"), ...holders.filter((r) => r === "admin")].map((r) => ROLE_ASK[r]);
  const askLine = ask.length > 0 ? ` Ask ${listWithOr(ask)}.` : "";
  return `${ROLE_PLURALS[role]} can ${ROLE_CAN[role]}, but not ${CAPABILITY_WORDS[permission]}.${askLine}`;
}

export function isRole(value: unknown): value is Role {
  return typeof value === "string" && (ROLES as readonly string[]).includes(value);
}
