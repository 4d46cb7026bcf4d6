import { can, type Permission, type Role } from "./permissions";

export type NavItem = { to: string; label: string; permission: Permission; end?: boolean };

/** The whole product's navigation; each entry shows only to roles holding its permission. */
export const NAV: NavItem[] = [
  { to: "/", label: "Shop floor", permission: "shop:read", end: true },
  { to: "/builds", label: "Builds", permission: "builds:read" },
  { to: "/procedures", label: "Procedures", permission: "shop:read" },
  { to: "/recordings", label: "Recordings", permission: "shop:read" },
  { to: "/test-records", label: "Test records", permission: "shop:read" },
  { to: "/calculators", label: "Calculators", permission: "calc:use" },
  { to: "/search", label: "Search", permission: "search:use" },
  { to: "/admin", label: "Admin", permission: "user:manage" },
];

export function navFor(role: Role): NavItem[] {
  return NAV.filter((item) => can(role, item.permission));
}
