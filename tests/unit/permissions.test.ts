import { describe, expect, it } from "vitest";
import { can, mayEver, permissionTable, roles, type Actor, type Role } from "@/lib/permissions";

const home = { id: "h1", organizationId: "org-a" };
const actor = (role: Role, extra: Partial<Actor> = {}): Actor => ({
  userId: "u",
  name: "Test",
  email: "t@example.test",
  role,
  organizationId: "org-a",
  organizationName: "A",
  householdHomeIds: [],
  assignedHomeIds: [],
  ...extra,
});

describe("permission table", () => {
  it("every action names only known roles", () => {
    for (const grants of Object.values(permissionTable)) {
      for (const role of Object.keys(grants)) expect(roles).toContain(role);
    }
  });

  it("never lets anyone act on another company's home", () => {
    for (const role of roles) {
      for (const action of Object.keys(permissionTable) as (keyof typeof permissionTable)[]) {
        const a = actor(role, { householdHomeIds: ["h1"], assignedHomeIds: ["h1"], organizationId: "org-b" });
        expect(can(a, action, home)).toBe(false);
      }
    }
  });

  it("homeowners read only their own household's home, and edit nothing but preset order", () => {
    expect(can(actor("homeowner"), "home:read", home)).toBe(false);
    const member = actor("homeowner", { householdHomeIds: ["h1"] });
    expect(can(member, "home:read", home)).toBe(true);
    expect(can(member, "preset:reorder", home)).toBe(true);
    expect(can(member, "zone:edit", home)).toBe(false);
    expect(can(member, "guest:unlock", home)).toBe(false);
    expect(mayEver(member, "library:read")).toBe(false);
  });

  it("installers edit zones only in homes they are assigned to, and never unlock guest controls", () => {
    expect(can(actor("installer"), "zone:edit", home)).toBe(false);
    const assigned = actor("installer", { assignedHomeIds: ["h1"] });
    expect(can(assigned, "zone:edit", home)).toBe(true);
    expect(can(assigned, "guest:unlock", home)).toBe(false);
    expect(can(assigned, "template:duplicate")).toBe(true);
  });

  it("support locks and unlocks guest controls and re-pushes, but edits no levels or curves", () => {
    const support = actor("support");
    expect(can(support, "guest:lock", home)).toBe(true);
    expect(can(support, "guest:unlock", home)).toBe(true);
    expect(can(support, "push:repush", home)).toBe(true);
    expect(can(support, "zone:edit", home)).toBe(false);
    expect(can(support, "curve:edit")).toBe(false);
  });

  it("only the owner manages the team", () => {
    expect(roles.filter((r) => can(actor(r), "team:manage"))).toEqual(["owner"]);
  });
});
