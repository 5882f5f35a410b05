import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { listTeam } from "@/db/queries/overview";
import { can, roleLabels, type Role } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Team" };

export default async function TeamPage() {
  const actor = await requirePageActor("/team");
  if (!can(actor, "team:read")) return <ForbiddenNotice />;
  const people = await listTeam({ actor });
  return (
    <div>
      <h1 className="text-2xl font-semibold">Team and households</h1>
      <p className="text-sm text-slate-600">Everyone with a sign-in at {actor.organizationName}.</p>
      <div className="mt-4 overflow-x-auto rounded-lg border border-slate-200 bg-white">
        <table className="w-full text-left text-sm">
          <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
            <tr><th scope="col" className="px-4 py-2">Name</th><th scope="col" className="px-4 py-2">E-mail</th><th scope="col" className="px-4 py-2">Role</th><th scope="col" className="px-4 py-2">Since</th></tr>
          </thead>
          <tbody className="divide-y divide-slate-100">
            {people.map((p) => (
              <tr key={p.memberId}>
                <td className="px-4 py-2 font-medium">{p.name}</td>
                <td className="px-4 py-2">{p.email}</td>
                <td className="px-4 py-2">{roleLabels[p.role as Role] ?? p.role}</td>
                <td className="px-4 py-2 text-slate-600">{p.since.toLocaleDateString("en-GB")}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
