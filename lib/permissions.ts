// The one role table. Every route handler and server action asks `can()` on the
// server; the UI asks the same table only to hide what would be refused anyway.

export const roles = ["owner", "integrator", "installer", "support", "homeowner"] as const;
export type Role = (typeof roles)[number];
export const staffRoles: Role[] = ["owner", "integrator", "installer", "support"];

export const roleLabels: Record<Role, string> = {
  owner: "Owner",
  integrator: "Integrator",
  installer: "Installer",
  support: "Support",
  homeowner: "Homeowner",
};

/**
 * Scope of a grant:
 * - "company": any home of the actor's company;
 * - "assigned": only homes the actor is assigned to work on (installers);
 * - "household": only homes the actor belongs to as a household member.
 */
type Scope = "company" | "assigned" | "household";
type Grants = Partial<Record<Role, Scope>>;

const everyStaff: Grants = { owner: "company", integrator: "company", installer: "company", support: "company" };
const designers: Grants = { owner: "company", integrator: "company" };

export const permissionTable = {
  "company:manage": { owner: "company" },
  "team:read": everyStaff,
  "team:manage": { owner: "company" },
  "home:read": { ...everyStaff, homeowner: "household" },
  "home:create": { ...designers, installer: "company" },
  "home:update": designers,
  "home:delete": designers,
  "home:assign": designers,
  "zone:read": { ...everyStaff, homeowner: "household" },
  "zone:create": { ...designers, installer: "assigned" },
  "zone:edit": { ...designers, installer: "assigned" },
  "zone:delete": designers,
  /** The read-only history of a deleted zone. */
  "zone:read-deleted": designers,
  "guest:edit": { ...designers, installer: "assigned" },
  "guest:lock": { ...designers, support: "company" },
  "guest:unlock": { ...designers, support: "company" },
  "preset:reorder": { ...designers, installer: "assigned", homeowner: "household" },
  "device:read": everyStaff,
  "device:bind": { ...designers, installer: "assigned" },
  "device:care": { ...designers, support: "company" },
  "library:read": everyStaff,
  "curve:edit": designers,
  "template:edit": designers,
  "template:duplicate": { ...designers, installer: "company" },
  "template:apply": { ...designers, installer: "assigned" },
  "push:read": everyStaff,
  "push:create": { ...designers, installer: "assigned" },
  "push:repush": { ...designers, support: "company" },
  "audit:read": everyStaff,
  "backup:export": { ...designers, support: "company" },
  "backup:restore": designers,
  "invite:team": { owner: "company" },
  "invite:household": designers,
  "mailbox:read": designers,
} satisfies Record<string, Grants>;

export type Action = keyof typeof permissionTable;

export interface Actor {
  userId: string;
  name: string;
  email: string;
  role: Role;
  organizationId: string;
  organizationName: string;
  /** Homes this person belongs to as a household member. */
  householdHomeIds: string[];
  /** Homes an installer is assigned to. */
  assignedHomeIds: string[];
}

export interface HomeRef {
  id: string;
  organizationId: string;
}

/** May the actor do this at all (somewhere)? For navigation and buttons. */
export function mayEver(actor: Pick<Actor, "role">, action: Action): boolean {
  return (permissionTable[action] as Grants)[actor.role] !== undefined;
}

/**
 * May the actor do this, to this home (when the action concerns one)?
 * Fails closed: a home of another company, or an action without a grant for
 * the role, is refused.
 */
export function can(actor: Actor, action: Action, home?: HomeRef | null): boolean {
  const scope = (permissionTable[action] as Grants)[actor.role];
  if (!scope) return false;
  if (!home) return scope === "company";
  if (home.organizationId !== actor.organizationId) return false;
  switch (scope) {
    case "company":
      return true;
    case "assigned":
      return actor.assignedHomeIds.includes(home.id);
    case "household":
      return actor.householdHomeIds.includes(home.id);
  }
}

/** Which homes of the company may the actor list? `null` means all of them. */
export function visibleHomeIds(actor: Actor): string[] | null {
  if (actor.role === "homeowner") return actor.householdHomeIds;
  return null;
}
