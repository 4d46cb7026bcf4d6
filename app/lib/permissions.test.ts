import { describe, expect, it } from "vitest";
import { PERMISSIONS, ROLES, can, canOnOwned, isRole } from "./permissions";

describe("permissions", () => {
  it("apprentices can read, search and calculate but change nothing", () => {
    const allowed = Object.entries(PERMISSIONS)
      .filter(([, roles]) => (roles as readonly string[]).includes("apprentice"))
      .map(([name]) => name)
      .sort();
    expect(allowed).toEqual(["account:edit-own", "calc:use", "procedure:watch", "search:use", "shop:read"]);
  });

  it("only admins manage people and see the outbox", () => {
    for (const role of ROLES) {
      expect(can(role, "user:manage")).toBe(role === "admin");
      expect(can(role, "outbox:view")).toBe(role === "admin");
    }
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
});
