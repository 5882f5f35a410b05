import { TeamManager, invitationsKey, teamKey } from "@/components/team/team-manager";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { SWRProvider } from "@/components/ui/swr-provider";
import { listInvitations } from "@/db/queries/invitations";
import { getTeam, listInvitableHomes } from "@/db/queries/team";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Team" };

export default async function TeamPage() {
  const actor = await requirePageActor("/team");
  if (!can(actor, "team:read")) return <ForbiddenNotice />;
  const rights = {
    canManage: can(actor, "team:manage"),
    canInviteTeam: can(actor, "invite:team"),
    canInviteHousehold: can(actor, "invite:household"),
  };
  const [team, invitations, homes] = await Promise.all([
    getTeam({ actor }),
    rights.canInviteTeam || rights.canInviteHousehold ? listInvitations({ actor }) : Promise.resolve([]),
    listInvitableHomes({ actor }),
  ]);
  return (
    <div className="space-y-4">
      <div>
        <h1 className="text-2xl font-semibold">Team and households</h1>
        <p className="text-sm text-slate-600">Everyone with a sign-in at {actor.organizationName}: your team, and the households who see their own home.</p>
      </div>
      <SWRProvider fallback={{ [teamKey]: team, [invitationsKey]: { items: invitations } }}>
        <TeamManager rights={rights} invitableHomes={homes.map(({ id, name }) => ({ id, name }))} />
      </SWRProvider>
    </div>
  );
}
