import { EmptyState } from "@/components/ui/empty-state";
import { ForbiddenNotice } from "@/components/ui/forbidden-notice";
import { listRecentActivity } from "@/db/queries/overview";
import { can } from "@/lib/permissions";
import { requirePageActor } from "@/lib/session";

export const metadata = { title: "Activity" };

export default async function ActivityPage() {
  const actor = await requirePageActor("/activity");
  if (!can(actor, "audit:read")) return <ForbiddenNotice />;
  const events = await listRecentActivity({ actor });
  return (
    <div>
      <h1 className="text-2xl font-semibold">Activity</h1>
      <p className="text-sm text-slate-600">Every change, who made it and when — newest first.</p>
      {events.length === 0 ? (
        <EmptyState title="No activity yet." />
      ) : (
        <ol className="mt-4 divide-y divide-slate-100 rounded-lg border border-slate-200 bg-white">
          {events.map((e) => (
            <li key={e.id} className="px-4 py-3 text-sm">
              <div className="flex flex-wrap justify-between gap-2">
                <span className="font-medium">{e.summary}</span>
                <time className="text-slate-500" dateTime={e.createdAt.toISOString()}>{e.createdAt.toLocaleString("en-GB")}</time>
              </div>
              <p className="text-slate-600">
                {e.actorName} ({e.actorRole}){e.homeName ? ` · ${e.homeName}` : ""} · <span className="font-mono text-xs">{e.kind}</span>
              </p>
              {e.changes.length > 0 ? (
                <ul className="mt-1 text-xs text-slate-600">
                  {e.changes.map((c) => (
                    <li key={c.field}><span className="font-mono">{c.field}</span>: {JSON.stringify(c.before)} → {JSON.stringify(c.after)}</li>
                  ))}
                </ul>
              ) : null}
            </li>
          ))}
        </ol>
      )}
    </div>
  );
}
