import { EmptyState } from "@/components/ui/empty-state";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { LibraryTabs } from "@/components/library/library-tabs";
import { listLibrary } from "@/db/queries/overview";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Zone templates" };

export default async function ZoneTemplatesPage() {
  const actor = await requirePageActor("/library/templates");
  if (!can(actor, "library:read")) return <ForbiddenNotice />;
  const { templates } = await listLibrary({ actor });
  return (
    <div className="space-y-4">
      <LibraryTabs />
      <section>
        <h1 className="text-2xl font-semibold">Zone templates</h1>
        {templates.length === 0 ? (
          <EmptyState title="No zone templates yet." />
        ) : (
          <ul className="mt-3 divide-y divide-slate-100 rounded-lg border border-slate-200 bg-white">
            {templates.map((t) => (
              <li key={t.id} className="flex flex-wrap items-baseline justify-between gap-2 px-4 py-3">
                <div>
                  <p className="font-medium">{t.name}</p>
                  <p className="text-sm text-slate-600">{t.description}</p>
                </div>
                <p className="text-sm text-slate-500">version {t.version} · {t.zoneCount} zone{t.zoneCount === 1 ? "" : "s"}</p>
              </li>
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}
