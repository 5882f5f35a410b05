import "server-only";
import { pool } from "@/db/client";
import { type Actor, type Role, roles } from "@/lib/permissions";

/**
 * Every request resolves its person to a role, so this is one prepared
 * statement: the memberships (oldest first) with the household homes and
 * assigned homes of that person, in one round trip.
 */
const actorStatement = {
  name: "zw_actor_v1",
  text: `select m.organization_id as "organizationId", o.name as "organizationName", m.role, u.name, u.email,
                coalesce((select array_agg(hm.home_id::text) from household_members hm where hm.user_id = u.id), '{}') as "householdHomeIds",
                coalesce((select array_agg(ha.home_id::text) from home_assignments ha where ha.user_id = u.id), '{}') as "assignedHomeIds"
         from member m
         join organization o on o.id = m.organization_id
         join "user" u on u.id = m.user_id
         where m.user_id = $1
         order by m.created_at`,
};

interface MembershipRow {
  organizationId: string;
  organizationName: string;
  role: string;
  name: string;
  email: string;
  householdHomeIds: string[];
  assignedHomeIds: string[];
}

/** Resolve a user to their role in their (active) company. */
export async function loadActor(input: { userId: string; activeOrganizationId: string | null }): Promise<Actor | null> {
  const { rows } = await pool.query<MembershipRow>({ ...actorStatement, values: [input.userId] });
  const chosen = rows.find((m) => m.organizationId === input.activeOrganizationId) ?? rows[0];
  if (!chosen || !(roles as readonly string[]).includes(chosen.role)) return null;
  const role = chosen.role as Role;
  // Household and assignment rows only count for the roles they belong to.
  return {
    userId: input.userId,
    name: chosen.name,
    email: chosen.email,
    role,
    organizationId: chosen.organizationId,
    organizationName: chosen.organizationName,
    householdHomeIds: role === "homeowner" ? chosen.householdHomeIds : [],
    assignedHomeIds: role === "installer" ? chosen.assignedHomeIds : [],
  };
}
