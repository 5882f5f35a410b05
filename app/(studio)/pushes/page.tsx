import { EmptyState } from "@/components/ui/empty-state";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { listRecentPushes } from "@/db/queries/overview";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Pushes" };

export default async function PushesPage() {
  const actor = await requirePageActor("/pushes");
  if (!can(actor, "push:read")) return <ForbiddenNotice />;
  const rows = await listRecentPushes({ actor });
  return (
    <div>
      <h1 className="text-2xl font-semibold">Pushes</h1>
      <p className="text-sm text-slate-600">Configurations sent to client homes, and how each device answered.</p>
      {rows.length === 0 ? (
        <div className="mt-4"><EmptyState title="Nothing has been pushed yet.">Pushes you start from a home’s board appear here.</EmptyState></div>
      ) : (
        <table className="mt-4 w-full rounded-lg border border-slate-200 bg-white text-left text-sm">
          <thead className="bg-slate-50 text-xs uppercase tracking-wide text-slate-500">
            <tr><th scope="col" className="px-4 py-2">Scope</th><th scope="col" className="px-4 py-2">By</th><th scope="col" className="px-4 py-2">When</th><th scope="col" className="px-4 py-2">Targets</th></tr>
          </thead>
          <tbody className="divide-y divide-slate-100">
            {rows.map((p) => (
              <tr key={p.id}>
                <td className="px-4 py-2">{p.scopeLabel}</td>
                <td className="px-4 py-2">{p.createdBy ?? "—"}</td>
                <td className="px-4 py-2">{p.createdAt.toLocaleString("en-GB")}</td>
                <td className="px-4 py-2">{Object.entries(p.counts).map(([state, n]) => `${n} ${state.replace("_", " ")}`).join(", ")}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </div>
  );
}
