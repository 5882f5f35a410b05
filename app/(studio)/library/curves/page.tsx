import { EmptyState } from "@/components/ui/empty-state";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { LibraryTabs } from "@/components/library/library-tabs";
import { listLibrary } from "@/db/queries/overview";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Tone curves" };

export default async function ToneCurvesPage() {
  const actor = await requirePageActor("/library/curves");
  if (!can(actor, "library:read")) return <ForbiddenNotice />;
  const { curves } = await listLibrary({ actor });
  return (
    <div className="space-y-4">
      <LibraryTabs />
      <section>
        <h1 className="text-2xl font-semibold">Tone curves</h1>
        <p className="text-sm text-slate-600">Parametric EQ curves your team attaches to sources, stations and zones.</p>
        {curves.length === 0 ? (
          <EmptyState title="No tone curves yet." />
        ) : (
          <ul className="mt-3 divide-y divide-slate-100 rounded-lg border border-slate-200 bg-white" data-testid="curve-list">
            {curves.map((c) => (
              <li key={c.id} className="flex flex-wrap items-baseline justify-between gap-2 px-4 py-3">
                <div>
                  <p className="font-medium">{c.name}</p>
                  <p className="text-sm text-slate-600">{c.description}</p>
                </div>
                <p className="text-sm text-slate-500">{c.bandCount} band{c.bandCount === 1 ? "" : "s"} · attached {c.usedBy}×</p>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
