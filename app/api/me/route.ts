import { apiHandler } from "@/lib/api/handler";
import { mayEver, permissionTable, type Action } from "@/lib/permissions";

export const GET = apiHandler({}, async ({ actor }) => ({
  userId: actor.userId,
  name: actor.name,
  email: actor.email,
  role: actor.role,
  organization: { id: actor.organizationId, name: actor.organizationName },
  allowed: (Object.keys(permissionTable) as Action[]).filter((a) => mayEver(actor, a)),
}));
