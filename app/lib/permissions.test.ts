import { describe, expect, it } from "vitest";
import { CAPABILITY_WORDS, PERMISSIONS, ROLES, can, canOnOwned, forbiddenReason, isRole, type Permission } from "./permissions";

describe("permissions", () => {
  it("apprentices can read, search and calculate but change nothing", () => {
    const allowed = Object.entries(PERMISSIONS)
      .filter(([, roles]) => (roles as readonly string[]).includes("apprentice"))
      .map(([name]) => name)
      .sort();
    expect(allowed).toEqual(["account:edit-own", "builds:read", "calc:use", "procedure:watch", "search:use", "shop:read"]);
  });

  it("only admins manage people and see the outbox", () => {
    for (const role of ROLES) {
      expect(can(role, "user:manage")).toBe(role === "admin");
      expect(can(role, "outbox:view")).toBe(role === "admin");
    }
  });

  it("an unfinished upload is its starter's to continue or discard, and any admin's", () => {
    const builder = { id: "u1", role: "builder" as const };
    const admin = { id: "u2", role: "admin" as const };
    const apprentice = { id: "u3", role: "apprentice" as const };
    expect(canOnOwned(builder, "upload:manage", "u1")).toBe(true);
    expect(canOnOwned(builder, "upload:manage", "u9")).toBe(false);
    expect(canOnOwned(admin, "upload:manage", "u9")).toBe(true);
    expect(canOnOwned(apprentice, "upload:manage", "u3")).toBe(false);
    expect(ROLES.filter((r) => can(r, "upload:manage:any"))).toEqual(["admin"]);
  });

  it("only editors and admins review procedures", () => {
    expect(ROLES.filter((r) => can(r, "procedure:review"))).toEqual(["admin", "editor"]);
  });

  it("every capability names only known roles and at least one", () => {
    for (const roles of Object.values(PERMISSIONS)) {
      expect(roles.length).toBeGreaterThan(0);
      for (const r of roles) expect(isRole(r)).toBe(true);
    }
  });

  it("own variants apply to the owner only; any variants to everyone's", () => {
    const builder = { id: "u1", role: "builder" as const };
    const editor = { id: "u2", role: "editor" as const };
    const apprentice = { id: "u3", role: "apprentice" as const };
    expect(canOnOwned(builder, "mark:edit", "u1")).toBe(true);
    expect(canOnOwned(builder, "mark:edit", "u9")).toBe(false);
    expect(canOnOwned(editor, "mark:edit", "u9")).toBe(true);
    expect(canOnOwned(apprentice, "mark:edit", "u3")).toBe(false);
    expect(canOnOwned(null, "mark:edit", "u1")).toBe(false);
    expect(canOnOwned(builder, "mark:edit", null)).toBe(false);
  });

  it("no role and unknown strings hold nothing", () => {
    expect(can(null, "shop:read")).toBe(false);
    expect(isRole("superuser")).toBe(false);
  });

  it("a refusal says in the shop's words what the role can do, what it cannot and whom to ask", () => {
    expect(forbiddenReason("apprentice", "procedure:draft")).toBe(
      "Apprentices can read procedures, watch recordings and use the calculators, but not write procedures. Ask an editor, a senior builder or an admin.",
    );
    expect(forbiddenReason("builder", "procedure:review")).toBe(
      "Senior builders can write procedures, record work at the bench and file test records, but not review and publish procedures. Ask an editor or an admin.",
    );
  });

  it("no refusal shows a capability's name, for any role and capability", () => {
    for (const permission of Object.keys(PERMISSIONS) as Permission[]) {
      expect(CAPABILITY_WORDS[permission]).not.toMatch(/[:_]/);
      for (const role of ROLES) {
        if (can(role, permission)) continue;
        const reason = forbiddenReason(role, permission);
        expect(reason).not.toContain(permission);
        expect(reason).not.toMatch(/“|:[a-z]/);
      }
    }
  });
});
